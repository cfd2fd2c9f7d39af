// Writes every signed demo report version as files anyone can check with their own tools:
// <accession>-v<version>.pdf (the signed PDF, byte for byte), .html (the narrative as a page), .txt
// (the narrative as text), and SHA256SUMS (the PDFs' SHA-256 as stored at signing; `sha256sum -c`).
// Run: npm run report:export -- DIR (bash scripts/report-export.sh makes the database).
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { loadConfig } from '../server/config';
import { prepareDatabase } from '../server/cli/prepare-database';
import { createDataSource } from '../server/db/data-source';
import { seedDemo } from '../server/demo/seed';
import { fingerprintInPdf, sha256Hex } from '../server/report-document';

const outDir = process.argv[2];
const databaseUrl = process.env.DATABASE_URL;
if (!outDir || !databaseUrl || !/\/isobar_export$/.test(databaseUrl)) {
  console.error('usage: npm run report:export -- DIR (DATABASE_URL must point at the isobar_export database)');
  process.exit(2);
}

/** A file name part from an accession: letters, digits, dot, dash and underscore only. */
const safe = (s: string) => s.replace(/[^A-Za-z0-9._-]/g, '_');

async function main(): Promise<void> {
  const config = loadConfig();
  await prepareDatabase(process.env.MIGRATION_DATABASE_URL!, databaseUrl!);
  const ds = createDataSource(databaseUrl!, 2);
  await ds.initialize();
  try {
    const began = performance.now();
    // The demo's signed and amended studies are signed here, through the signing code.
    await seedDemo(ds, config.oidc.issuer);
    const versions: Array<{ accession: string; version_no: number; status: string; signer_name: string; pdf: Buffer; pdf_sha256: string; content_sha256: string; narrative_html: string; narrative_text: string }> =
      await ds.query(
        `SELECT s.accession, v.version_no, v.status, v.signer_name, f.pdf, f.pdf_sha256, v.content_sha256, v.narrative_html, v.narrative_text
         FROM report_version v JOIN study s ON s.id = v.study_id JOIN report_pdf f ON f.report_version_id = v.id ORDER BY s.accession, v.version_no`,
      );
    if (!versions.length) throw new Error('The demo produced no signed report version.');
    mkdirSync(outDir, { recursive: true });
    const sums: string[] = [];
    for (const v of versions) {
      const base = `${safe(v.accession)}-v${v.version_no}`;
      if (sha256Hex(v.pdf) !== v.pdf_sha256) throw new Error(`${base}: the PDF does not match the SHA-256 stored when it was signed.`);
      if (fingerprintInPdf(v.pdf) !== v.content_sha256) throw new Error(`${base}: the PDF does not name its content fingerprint.`);
      writeFileSync(join(outDir, `${base}.pdf`), v.pdf);
      writeFileSync(join(outDir, `${base}.html`), v.narrative_html);
      writeFileSync(join(outDir, `${base}.txt`), v.narrative_text.endsWith('\n') ? v.narrative_text : `${v.narrative_text}\n`);
      sums.push(`${v.pdf_sha256}  ${base}.pdf`);
      console.log(`${base}  ${v.status.padEnd(7)}  ${String(v.pdf.length).padStart(7)} bytes  signed by ${v.signer_name}  fingerprint ${v.content_sha256.slice(0, 16)}`);
    }
    writeFileSync(join(outDir, 'SHA256SUMS'), `${sums.join('\n')}\n`);
    console.log(`${versions.length} signed versions written to ${outDir} in ${((performance.now() - began) / 1000).toFixed(1)} s (check the PDFs: cd DIR && sha256sum -c SHA256SUMS)`);
  } finally {
    await ds.destroy();
  }
}

main().catch((error) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
