import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { TemplateVersionDetail, TemplateVersionSummary } from '../../shared/settings/admin';
import { templateVersionPattern } from '../../shared/settings/lab-settings';

/**
 * The report template versions shipped in `templates/report/<version>/`: each a folder with an
 * `html/` and a `text/` set of Handlebars files whose entry is `report.hbs`. Read from disk, so a
 * release that ships a new folder offers it without a code change.
 */

export type { TemplateVersionSummary, TemplateVersionDetail } from '../../shared/settings/admin';

const root = (dir = process.cwd()) => resolve(dir, 'templates', 'report');
/** A template version's number ("v3" → 3). */
export const versionNumber = (v: string) => Number(v.slice(1));

function isComplete(dir: string): boolean {
  return ['html', 'text'].every((m) => existsSync(join(dir, m, 'report.hbs')));
}

function describe(dir: string): string | null {
  const about = join(dir, 'ABOUT.md');
  if (!existsSync(about)) return null;
  const text = readFileSync(about, 'utf8').replace(/^#.*\n/, '').trim();
  return text.split(/\n\s*\n/)[0]?.replace(/\s+/g, ' ').trim() || null;
}

function templateFiles(dir: string): Array<{ medium: 'html' | 'text'; name: string }> {
  const out: Array<{ medium: 'html' | 'text'; name: string }> = [];
  for (const medium of ['html', 'text'] as const) {
    const names = readdirSync(join(dir, medium)).filter((f) => f.endsWith('.hbs')).sort((a, b) => Number(b === 'report.hbs') - Number(a === 'report.hbs') || a.localeCompare(b));
    for (const name of names) out.push({ medium, name });
  }
  return out;
}

/** Every complete version shipped, oldest first. */
export function listTemplateVersions(dir?: string): TemplateVersionSummary[] {
  const base = root(dir);
  if (!existsSync(base)) return [];
  return readdirSync(base)
    .filter((v) => templateVersionPattern.test(v) && statSync(join(base, v)).isDirectory() && isComplete(join(base, v)))
    .sort((a, b) => versionNumber(a) - versionNumber(b))
    .map((version) => ({ version, description: describe(join(base, version)), files: templateFiles(join(base, version)).length }));
}

export function isShippedTemplateVersion(version: string, dir?: string): boolean {
  return templateVersionPattern.test(version) && listTemplateVersions(dir).some((v) => v.version === version);
}

/** One version with the text of each template file; null when no such version is shipped. */
export function readTemplateVersion(version: string, dir?: string): TemplateVersionDetail | null {
  if (!isShippedTemplateVersion(version, dir)) return null;
  const base = join(root(dir), version);
  const files = templateFiles(base);
  return {
    version,
    description: describe(base),
    files: files.length,
    sources: files.map((f) => ({ ...f, text: readFileSync(join(base, f.medium, f.name), 'utf8') })),
  };
}
