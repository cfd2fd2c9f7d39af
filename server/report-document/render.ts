import { readdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import Handlebars from 'handlebars';
import type { Cell, ReportView } from './view-model';

/**
 * The narrative report from its view model, through the versioned Handlebars templates in
 * `templates/report/<version>/`: `report.hbs` plus partials in `html/` (markup, every value escaped
 * by `{{…}}`) and in `text/` (plain text, nothing escaped because nothing is markup).
 */

export interface Narrative {
  html: string;
  text: string;
  templateVersion: string;
}

type Medium = 'html' | 'text';

interface Compiled {
  html: Handlebars.TemplateDelegate<ReportView>;
  text: Handlebars.TemplateDelegate<ReportView>;
}

const cache = new Map<string, Compiled>();

/** The folder that holds the templates of one version (resolved from the project root). */
function templateDir(version: string, root = process.cwd()): string {
  if (!/^v\d+$/.test(version)) throw new Error(`Unknown report template version "${version}".`);
  return resolve(root, 'templates', 'report', version);
}

/** Pads the cells of a table into aligned plain-text columns. */
function textTable(columns: string[], rows: string[][]): string {
  const widths = columns.map((c, i) => Math.max(c.length, ...rows.map((r) => (r[i] ?? '').length)));
  const line = (cells: string[]) =>
    cells
      .map((c, i) => (i === cells.length - 1 ? c : c.padEnd(widths[i])))
      .join('  ')
      .trimEnd();
  return [line(columns), line(widths.map((w) => '-'.repeat(w))), ...rows.map(line)].join('\n');
}

const cellText = (c: Cell) => (c.flagText && c.flagText !== 'normal' ? `${c.text} (${c.flagText})` : c.text);

function environment(medium: Medium, dir: string): typeof Handlebars {
  const hb = Handlebars.create();
  for (const file of readdirSync(join(dir, medium)).filter((f) => f.endsWith('.hbs'))) {
    hb.registerPartial(file.replace(/\.hbs$/, ''), readFileSync(join(dir, medium, file), 'utf8'));
  }
  /** A table of cells as aligned plain text. */
  // `marks=true` (template v4 on) prints each cell's footnote mark and the table's footnotes under it.
  hb.registerHelper('textTable', (table: { columns: string[]; rows: Cell[][]; footnotes?: string[] }, options?: { hash?: { marks?: boolean } }) => {
    if (options?.hash?.marks !== true) return textTable(table.columns, table.rows.map((r) => r.map(cellText)));
    const grid = textTable(table.columns, table.rows.map((r) => r.map((c) => (c.mark ? `${cellText(c)} ${c.mark}` : cellText(c)))));
    return [grid, ...(table.footnotes ?? [])].join('\n');
  });
  /** The acetylcholine doses as aligned plain text. */
  hb.registerHelper('doseTable', (ach: NonNullable<ReportView['acetylcholine']>) =>
    textTable(
      ach.doseColumns.map((c) => c.label),
      // Plain-text columns never wrap: the no-break space that holds a dose to its unit is a plain space here.
      ach.doses.map((d) => ach.doseColumns.map((c) => d[c.key].replace(/\u00a0/g, ' '))),
    ),
  );
  /** A row's value by column key (HTML dose table). */
  hb.registerHelper('lookupKey', (row: Record<string, string>, key: string) => row[key]);
  /** An underline as long as the heading before it. */
  hb.registerHelper('underline', (s: string, ch: string) => (typeof ch === 'string' ? ch : '=').repeat(String(s).length));
  hb.registerHelper('eq', (a: unknown, b: unknown) => a === b);
  return hb;
}

function compile(version: string): Compiled {
  const hit = cache.get(version);
  if (hit) return hit;
  const dir = templateDir(version);
  const html = environment('html', dir).compile<ReportView>(readFileSync(join(dir, 'html', 'report.hbs'), 'utf8'), { strict: false });
  const text = environment('text', dir).compile<ReportView>(readFileSync(join(dir, 'text', 'report.hbs'), 'utf8'), { noEscape: true });
  const compiled = { html, text };
  cache.set(version, compiled);
  return compiled;
}

/** Tidies template whitespace: no trailing spaces, at most one blank line in a row. */
function tidyText(s: string): string {
  return `${s
    .split('\n')
    .map((l) => l.trimEnd())
    .join('\n')
    .replace(/\n{3,}/g, '\n\n')
    .trim()}\n`;
}

function tidyHtml(s: string): string {
  return `${s
    .split('\n')
    .map((l) => l.trimEnd())
    .filter((l) => l.trim().length > 0)
    .join('\n')}\n`;
}

/** The narrative (an HTML fragment and plain text) in the view's template version. */
export function renderNarrative(view: ReportView): Narrative {
  const t = compile(view.templateVersion);
  return { html: tidyHtml(t.html(view)), text: tidyText(t.text(view)), templateVersion: view.templateVersion };
}

/** The narrative's plain text alone (what a signature's content holds), without rendering the HTML. */
export function renderNarrativeText(view: ReportView): string {
  return tidyText(compile(view.templateVersion).text(view));
}

/** The HTML fragment as a standalone page (for export and for opening in a browser). */
export function htmlDocument(view: ReportView, fragment: string): string {
  const title = Handlebars.escapeExpression(`${view.title}: ${view.patient.name}`);
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="report-template-version" content="${Handlebars.escapeExpression(view.templateVersion)}">
<title>${title}</title>
<style>
body { font-family: "Public Sans", system-ui, sans-serif; max-width: 60rem; margin: 2rem auto; padding: 0 1rem; color: #1c2430; line-height: 1.45; }
table { border-collapse: collapse; margin: .5rem 0 1rem; }
th, td { border-bottom: 1px solid #d5dae1; padding: .25rem .6rem; text-align: left; vertical-align: top; }
.flag-abnormal { font-weight: 600; color: #9b1c1c; }
.flag-borderline { font-weight: 600; color: #8a5a00; }
.caution { border-left: 3px solid #2f6fb0; background: #eef4fb; padding: .5rem .75rem; }
dl.identification { display: grid; grid-template-columns: max-content 1fr; gap: .15rem 1rem; }
dl.identification dt { color: #5b6675; }
dl.identification dd { margin: 0; }
</style>
</head>
<body>
${fragment}</body>
</html>
`;
}
