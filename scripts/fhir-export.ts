import { mkdirSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { loadConfig } from '../server/config';
import { prepareDatabase } from '../server/cli/prepare-database';
import { createDataSource } from '../server/db/data-source';
import { demoStudies } from '../server/demo/scenario';
import { seedDemo } from '../server/demo/seed';
import { BundleBuildError } from '../server/ehr/build-report-bundle';
import { bundleOfLoaded, loadReportVersion } from '../server/ehr/queries/report-version';
import { checkBundle, errorsOf, warmUpValidation, type Issue } from '../server/ehr/validate-bundle';

/**
 * Writes the FHIR transaction Bundle of every signed version of every demo study into a folder, as
 * `<accession>-v<version>.json`, exactly as the EHR delivery would send it. Each bundle is checked
 * with the delivery's own validator first; its issues are printed and a bundle with errors is not
 * written (the exit status is then 1). Run by `npm run fhir:export -- DIR`
 * (scripts/fhir-export.sh prepares the database: migrations and the demo scenario).
 */

const usage = 'usage: npm run fhir:export -- DIR';

const line = (issue: Issue) => `    ${issue.severity} ${issue.code}${issue.expression?.length ? ` at ${issue.expression.join(', ')}` : ''}: ${issue.diagnostics}`;

async function main(): Promise<number> {
  const args = process.argv.slice(2).filter((a) => a !== '--');
  if (args.length !== 1 || args[0].startsWith('-')) {
    console.error(usage);
    return 2;
  }
  // npm runs scripts in the project folder; a relative DIR means the folder npm was called from.
  const dir = resolve(process.env.INIT_CWD ?? process.cwd(), args[0]);
  mkdirSync(dir, { recursive: true });

  const config = loadConfig();
  await prepareDatabase(config.migrationDatabaseUrl, config.databaseUrl);
  const db = createDataSource(config.databaseUrl, 2);
  await db.initialize();
  try {
    await seedDemo(db, config.oidc.issuer);
    warmUpValidation();
    const rows: { id: string }[] = await db.query(
      `SELECT rv.id FROM report_version rv JOIN study ON study.id = rv.study_id
        WHERE study.accession = ANY($1::text[]) ORDER BY study.accession, rv.version_no`,
      [demoStudies.map((s) => s.accession)],
    );
    let written = 0;
    let failed = 0;
    for (const { id } of rows) {
      const loaded = (await loadReportVersion(db.manager, id))!;
      const name = `${loaded.accession}-v${loaded.version.versionNo}.json`;
      let issues: Issue[];
      let text: string | undefined;
      try {
        const bundle = bundleOfLoaded(loaded, config.ehr.identifierSystems);
        issues = checkBundle(bundle, { requireType: ['transaction'] });
        text = `${JSON.stringify(bundle, null, 2)}\n`;
      } catch (error) {
        if (!(error instanceof BundleBuildError)) throw error;
        issues = error.problems.map((p) => ({ severity: 'error', code: 'invalid', diagnostics: p }));
      }
      const errors = errorsOf(issues);
      if (errors.length === 0 && text) {
        writeFileSync(join(dir, name), text);
        written++;
        const entries = (JSON.parse(text) as { entry: { resource: { resourceType: string } }[] }).entry;
        const counts = new Map<string, number>();
        for (const e of entries) counts.set(e.resource.resourceType, (counts.get(e.resource.resourceType) ?? 0) + 1);
        console.log(`${name}: ${[...counts].map(([t, n]) => `${n} ${t}`).join(', ')}; ${issues.length === 0 ? 'no issues' : `${issues.length} issue(s), no errors`}`);
      } else {
        failed++;
        console.log(`${name}: NOT WRITTEN, ${errors.length} error(s)`);
      }
      for (const issue of issues) console.log(line(issue));
    }
    console.log(`${written} bundle(s) written to ${dir}${failed ? `; ${failed} not written because of errors` : ''}`);
    if (rows.length === 0) {
      console.error('no signed demo study versions were found');
      return 1;
    }
    return failed ? 1 : 0;
  } finally {
    await db.destroy();
  }
}

main().then(
  (code) => process.exit(code),
  (error) => {
    console.error(error instanceof Error ? error.message : error);
    process.exit(1);
  },
);
