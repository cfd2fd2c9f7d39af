import { createHash } from 'node:crypto';
import diagnosticsChannel from 'node:diagnostics_channel';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import pdfmakeDefault from 'pdfmake';
import type { Content, TableCell, TDocumentDefinitions } from 'pdfmake/interfaces';
import type { Cell, ReportView, Table } from './view-model';

/**
 * The one module that owns pdfmake: fonts, page size and margins, the header and footer on every
 * page, and the canonical content whose SHA-256 the footer prints. Given the same view it writes the
 * same bytes: the creation date is the signing time, and nothing else in the file depends on the clock.
 */

// ---------------------------------------------------------------------------------------------
// Canonical content and its fingerprint

/**
 * Canonical JSON of a value: object keys sorted by UTF-16 code units, no whitespace, `undefined`
 * members left out, numbers in their shortest round-trip form (as JSON.stringify writes them), dates
 * as ISO 8601 text. For plain data this is the JSON Canonicalization Scheme (RFC 8785), so anyone can
 * recompute the fingerprint with their own tools. Non-finite numbers and other non-JSON values throw.
 */
export function canonicalContent(value: unknown): string {
  return write(value, '$');
}

function write(value: unknown, where: string): string {
  if (value === null) return 'null';
  if (value instanceof Date) return JSON.stringify(value.toISOString());
  switch (typeof value) {
    case 'string':
      return JSON.stringify(value);
    case 'boolean':
      return value ? 'true' : 'false';
    case 'number':
      if (!Number.isFinite(value)) throw new TypeError(`canonicalContent: ${where} is not a finite number.`);
      return JSON.stringify(value);
    case 'object': {
      if (Array.isArray(value)) return `[${value.map((v, i) => (v === undefined ? 'null' : write(v, `${where}[${i}]`))).join(',')}]`;
      const obj = value as Record<string, unknown>;
      const keys = Object.keys(obj)
        .filter((k) => obj[k] !== undefined)
        .sort();
      return `{${keys.map((k) => `${JSON.stringify(k)}:${write(obj[k], `${where}.${k}`)}`).join(',')}}`;
    }
    default:
      throw new TypeError(`canonicalContent: ${where} is a ${typeof value}, which JSON cannot hold.`);
  }
}

/** SHA-256 (lowercase hex) of the canonical JSON of the signed content. */
export function fingerprint(content: unknown): string {
  return createHash('sha256').update(canonicalContent(content), 'utf8').digest('hex');
}

/** SHA-256 (lowercase hex) of bytes, e.g. of the PDF file. */
export function sha256Hex(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/**
 * The full content fingerprint written into a report PDF's metadata (its Subject), or null when the
 * bytes hold none. For "verify": an uploaded PDF names the signed content it prints even when its
 * bytes were re-saved by another program (a re-saved file has another SHA-256 but keeps its Subject,
 * unless that program rewrote the metadata).
 */
export function fingerprintInPdf(pdf: Uint8Array): string | null {
  const text = Buffer.from(pdf.buffer, pdf.byteOffset, pdf.byteLength).toString('latin1');
  const m = /\(Report version \d+, fingerprint ([0-9a-f]{64})\)/.exec(text);
  return m ? m[1] : null;
}

// ---------------------------------------------------------------------------------------------
// Fonts: Public Sans from the app's font package, held in pdfmake's virtual file system

interface PdfMake {
  setFonts(fonts: Record<string, Record<string, string>>): void;
  setUrlAccessPolicy(cb: (url: string) => boolean): void;
  setLocalAccessPolicy(cb: (path: string) => boolean): void;
  createPdf(doc: TDocumentDefinitions): { getBuffer(): Promise<Buffer> };
  setTableLayouts(layouts: Record<string, unknown>): void;
  virtualfs: { writeFileSync(name: string, data: Buffer): void };
}
const pdfmake = pdfmakeDefault as unknown as PdfMake;

const PDF_FONT = 'PublicSans';

const fontFiles = {
  normal: '400Regular/PublicSans_400Regular.ttf',
  bold: '700Bold/PublicSans_700Bold.ttf',
  italics: '400Regular_Italic/PublicSans_400Regular_Italic.ttf',
  bolditalics: '700Bold_Italic/PublicSans_700Bold_Italic.ttf',
} as const;

/**
 * The fonts are parsed once per process and shared by every document. pdfmake hands pdfkit the bytes
 * of each font, and pdfkit parses them with fontkit for every new document: its tables, then the
 * shaping (kerning, ligatures) of every word, which is most of the time a report takes. So what
 * pdfmake holds for each style is a short token instead of the TTF bytes, and a font format
 * registered with fontkit (`registerFormat`, its extension point) answers the token with the one
 * parsed font. Each document still embeds its own subset of the glyphs it uses.
 */
interface FontkitFont {
  layout(text: string, features?: unknown, ...rest: unknown[]): GlyphRun;
}
interface GlyphRun {
  glyphs: unknown[];
  positions: Array<{ xAdvance: number; yAdvance: number; xOffset: number; yOffset: number }>;
}
interface Fontkit {
  create(buffer: Uint8Array): FontkitFont;
  registerFormat(format: { probe(buffer: Uint8Array): boolean; new (stream: { buffer: Uint8Array }): unknown }): void;
}

const fontToken = (style: string) => Buffer.from(`isobar-shared-font:${style}`, 'latin1');
/** Words shaped per font, kept across documents; cleared when it grows past this many. */
const LAYOUT_CACHE_LIMIT = 50_000;

/**
 * A parsed font whose shaping results are remembered across documents. pdfkit scales the positions of
 * a run it receives in place, so each caller gets its own copy of the positions.
 */
function withSharedLayouts(font: FontkitFont): FontkitFont {
  const layout = font.layout.bind(font);
  const runs = new Map<string, GlyphRun>();
  font.layout = (text: string, features?: unknown, ...rest: unknown[]) => {
    if (features !== undefined || rest.length) return layout(text, features, ...rest);
    let run = runs.get(text);
    if (!run) {
      if (runs.size >= LAYOUT_CACHE_LIMIT) runs.clear();
      run = layout(text);
      runs.set(text, run);
    }
    const copy: GlyphRun = Object.create(Object.getPrototypeOf(run));
    Object.assign(copy, run);
    copy.positions = run.positions.map(({ xAdvance, yAdvance, xOffset, yOffset }) => ({ xAdvance, yAdvance, xOffset, yOffset }));
    return copy;
  };
  return font;
}

let ready = false;
/** Parses the report fonts once per thread (each render calls it; a rendering thread calls it when it starts). */
export function setUp(): void {
  if (ready) return;
  const require = createRequire(import.meta.url);
  // The fontkit that pdfkit itself loads (pdfmake → pdfkit → fontkit), so the format reaches it.
  const fontkit = createRequire(require.resolve('pdfkit'))('fontkit') as Fontkit;
  const shared = new Map<string, FontkitFont>();
  const family: Record<string, string> = {};
  for (const [style, file] of Object.entries(fontFiles)) {
    const token = fontToken(style);
    shared.set(token.toString('latin1'), withSharedLayouts(fontkit.create(readFileSync(require.resolve(`@expo-google-fonts/public-sans/${file}`)))));
    const name = `fonts/${file.split('/')[1]}`;
    pdfmake.virtualfs.writeFileSync(name, token);
    family[style] = name;
  }
  const tokenOf = (buffer: Uint8Array) => Buffer.from(buffer.buffer, buffer.byteOffset, buffer.byteLength).toString('latin1');
  fontkit.registerFormat(
    class SharedFont {
      static probe(buffer: Uint8Array): boolean {
        return buffer.byteLength < 64 && shared.has(tokenOf(buffer));
      }
      constructor(stream: { buffer: Uint8Array }) {
        // A constructor may answer with another object: here the font parsed at start.
        return shared.get(tokenOf(stream.buffer))!;
      }
    },
  );
  pdfmake.setFonts({ [PDF_FONT]: family });
  pdfmake.setTableLayouts(tableLayouts);
  // Everything the report needs is in memory: no URL and no local file may be read while rendering.
  pdfmake.setUrlAccessPolicy(() => false);
  pdfmake.setLocalAccessPolicy(() => false);
  ready = true;
}

// ---------------------------------------------------------------------------------------------
// Page

/** A4 portrait, margins in points (1/72 inch): left, top, right, bottom. */
export const PAGE = { size: 'A4', width: 595.28, margins: [48, 66, 48, 72] as [number, number, number, number] } as const;
const textWidth = PAGE.width - PAGE.margins[0] - PAGE.margins[2];

const ink = '#1c2430';
const muted = '#5b6675';
const rule = '#c9d0d8';

const sectionTitle = (text: string): Content => ({ text, style: 'h2' });
/** A bulleted list of the view's lines. pdfmake rewrites a list's items in place, so it gets a copy: the view stays as it was. */
const bullets = (items: readonly string[], margin?: [number, number, number, number]): Content => ({ ul: [...items], ...(margin ? { margin } : {}) });
const paras = (lines: string[]): Content[] => lines.map((text) => ({ text, margin: [0, 0, 0, 3] }));

function cellContent(c: Cell, first: boolean): TableCell {
  const flagged = c.flag === 'abnormal' || c.flag === 'borderline';
  const marked = c.mark ? `${c.text}\u00a0${c.mark}` : c.text;
  const text = flagged ? `${marked} ${c.flag === 'abnormal' ? '(abnormal)' : '(borderline)'}` : marked;
  return { text, bold: first || flagged };
}

function table(t: Table): Content {
  const grid: Content = {
    table: {
      headerRows: 1,
      dontBreakRows: true,
      widths: t.columns.map((_, i) => (i === 0 ? 'auto' : '*')),
      body: [t.columns.map((c) => ({ text: c, style: 'th' })), ...t.rows.map((r) => r.map((c, i) => cellContent(c, i === 0)))],
    },
    layout: 'report',
    margin: [0, 2, 0, t.footnotes?.length ? 2 : 8],
  };
  if (!t.footnotes?.length) return grid;
  return { stack: [grid, ...t.footnotes.map((text, i): Content => ({ text, fontSize: 8, color: muted, margin: [0, 0, 0, i === t.footnotes!.length - 1 ? 8 : 1] }))] };
}

function doseTable(ach: NonNullable<ReportView['acetylcholine']>): Content {
  return {
    table: {
      headerRows: 1,
      dontBreakRows: true,
      widths: ach.doseColumns.map((c) => (c.key === 'notes' ? '*' : 'auto')),
      body: [ach.doseColumns.map((c) => ({ text: c.label, style: 'th' })), ...ach.doses.map((d) => ach.doseColumns.map((c) => ({ text: d[c.key] })))],
    },
    layout: 'report',
    margin: [0, 2, 0, 4],
  };
}

/** The page header: patient identifiers, on every page. */
function header(view: ReportView): Content {
  return {
    margin: [PAGE.margins[0], 28, PAGE.margins[2], 0],
    stack: [
      {
        columns: [
          { text: [{ text: view.patient.name, bold: true }, `   MRN ${view.patient.mrn}   Born ${view.patient.birthDate}   ${view.patient.sex}`], width: '*' },
          { text: `Accession ${accessionOf(view)}`, alignment: 'right', width: 'auto' },
        ],
        fontSize: 8.5,
        color: ink,
      },
      { canvas: [{ type: 'line', x1: 0, y1: 4, x2: textWidth, y2: 4, lineWidth: 0.5, lineColor: rule }] },
    ],
  };
}

const accessionOf = (view: ReportView) => view.identification.find((i) => i.label === 'Accession')?.value ?? '';

/** The page footer: page x of y, report version, signer and time, short fingerprint. */
function footer(view: ReportView, page: number, pages: number): Content {
  const s = view.signature;
  const left = s
    ? `Report version ${s.reportVersion} · Signed by ${s.signedBy} · ${s.signedAt} · Fingerprint ${s.shortFingerprint}`
    : 'Preview: not signed';
  return {
    margin: [PAGE.margins[0], 24, PAGE.margins[2], 0],
    stack: [
      { canvas: [{ type: 'line', x1: 0, y1: 0, x2: textWidth, y2: 0, lineWidth: 0.5, lineColor: rule }] },
      {
        margin: [0, 4, 0, 0],
        columns: [
          { text: left, width: '*' },
          { text: `Page ${page} of ${pages}`, alignment: 'right', width: 'auto' },
        ],
        fontSize: 7.5,
        color: muted,
      },
      { text: `Report template ${view.templateVersion}`, fontSize: 7, color: muted },
    ],
  };
}

/** An addendum says first that it is one: the version it supersedes, why, and what changed. */
function amendmentBanner(a: NonNullable<ReportView['amendment']>, version: number | null): Content {
  const lines: Content[] = [
    { text: `AMENDED REPORT${version ? ` — version ${version}` : ''}`, bold: true },
    { text: a.supersedes },
  ];
  if (a.reason) lines.push({ text: `Reason: ${a.reason}` });
  if (a.changes.length) lines.push({ text: 'Changed:', margin: [0, 2, 0, 0] }, bullets(a.changes));
  return { table: { widths: ['*'], body: [[{ stack: lines, margin: [4, 3, 4, 3] }]] }, layout: { hLineWidth: () => 1, vLineWidth: () => 1, hLineColor: () => '#8a5a00', vLineColor: () => '#8a5a00' }, margin: [0, 0, 0, 8] };
}

/** The pdfmake document definition of a report (exposed for tests). */
function reportDocument(view: ReportView, createdAt: Date): TDocumentDefinitions {
  const content: Content[] = [];
  if (view.hospital) content.push({ text: `${view.hospital.name} · ${view.hospital.lab}`, color: muted, fontSize: 8.5 });
  content.push({ text: view.title, style: 'h1' });
  if (view.amendment) content.push(amendmentBanner(view.amendment, view.signature?.reportVersion ?? null));
  // Identification in two columns of label/value pairs.
  const half = Math.ceil(view.identification.length / 2);
  const pair = (i: { label: string; value: string } | undefined): TableCell[] => (i ? [{ text: i.label, color: muted }, { text: i.value }] : ['', '']);
  content.push({
    table: {
      widths: ['auto', '*', 'auto', '*'],
      body: view.identification.slice(0, half).map((left, k) => [...pair(left), ...pair(view.identification[half + k])]),
    },
    layout: 'noBorders',
    margin: [0, 0, 0, 6],
  });
  if (view.indication.text || view.indication.question) {
    content.push(sectionTitle('Indication'));
    if (view.indication.text) content.push({ text: view.indication.text });
    if (view.indication.question) content.push({ text: `Clinical question: ${view.indication.question}` });
  }
  if (view.technique.length) content.push(sectionTitle('Procedure and technique'), ...paras(view.technique));
  if (view.measurements) content.push(sectionTitle('Measurements'), table(view.measurements));
  if (view.indices) content.push(sectionTitle('Calculated indices'), table(view.indices));
  if (view.interpretation.length) {
    content.push(sectionTitle('Interpretation by vessel'));
    for (const v of view.interpretation) content.push({ text: v.vessel, style: 'h3' }, bullets(v.sentences, [0, 0, 0, 4]));
  }
  const ach = view.acetylcholine;
  if (ach) {
    content.push(sectionTitle('Acetylcholine testing'), { text: ach.protocol }, doseTable(ach));
    if (ach.result) content.push({ text: ach.result });
    if (ach.reversal) content.push({ text: ach.reversal });
  }
  if (view.endotype) {
    content.push(sectionTitle('Diagnosis: coronary function'), { text: view.endotype.label, bold: true });
    if (view.endotype.headline) content.push({ text: view.endotype.headline });
    if (view.endotype.reasons.length) content.push({ text: 'Reasons', style: 'h3' }, bullets(view.endotype.reasons));
  }
  if (view.lesionSummary.length) content.push(sectionTitle('Conclusion'), ...paras(view.lesionSummary));
  if (view.quality.length) content.push(sectionTitle('Measurement quality'), bullets(view.quality));
  content.push(sectionTitle('Complications'), ...paras(view.complications));
  if (view.impression.length) content.push(sectionTitle('Impression'), ...paras(view.impression));
  if (view.plan.length) content.push(sectionTitle('Recommendations and plan'), ...paras(view.plan));
  if (view.thresholds.length) {
    content.push(sectionTitle('Thresholds applied'), {
      table: {
        headerRows: 1,
        widths: ['*', 'auto', 'auto'],
        body: [
          [
            { text: 'Criterion', style: 'th' },
            { text: 'Value', style: 'th' },
            { text: 'Source', style: 'th' },
          ],
          ...view.thresholds.map((t) => [t.label, t.value, t.source]),
        ],
      },
      layout: 'report',
      fontSize: 8,
      margin: [0, 2, 0, view.thresholdsBasis ? 2 : 8],
    });
    if (view.thresholdsBasis) content.push({ text: view.thresholdsBasis, fontSize: 8, margin: [0, 0, 0, 8] });
  }
  content.push({
    table: { widths: ['*'], body: [[{ text: view.caution, fontSize: 8.5, color: ink, margin: [6, 4, 6, 4] }]] },
    layout: { hLineWidth: () => 0, vLineWidth: (i: number) => (i === 0 ? 2.5 : 0), vLineColor: () => '#2f6fb0', fillColor: () => '#eef4fb' },
    margin: [0, 8, 0, 8],
    unbreakable: true,
  });
  const s = view.signature;
  content.push(
    s
      ? {
          stack: [
            { text: `Electronically signed by ${s.signedBy} on ${s.signedAt}.`, bold: true },
            { text: `Report version ${s.reportVersion}. Content fingerprint (SHA-256) ${s.fingerprint}.`, fontSize: 8, color: muted },
            ...(s.amendmentReason ? [{ text: `Addendum: ${s.amendmentReason}` }] : []),
          ],
          unbreakable: true,
        }
      : { text: 'Preview: not signed.', italics: true },
  );

  return {
    pageSize: PAGE.size,
    pageOrientation: 'portrait',
    pageMargins: PAGE.margins,
    info: {
      title: `${view.title}: ${view.patient.name}, ${accessionOf(view)}`,
      author: s?.signedBy ?? 'Isobar',
      subject: view.signature ? `Report version ${view.signature.reportVersion}, fingerprint ${view.signature.fingerprint}` : 'Report preview',
      creator: 'Isobar',
      producer: 'Isobar',
      creationDate: createdAt,
    },
    header: () => header(view),
    footer: (page: number, pages: number) => footer(view, page, pages),
    content,
    defaultStyle: { font: PDF_FONT, fontSize: 9.5, lineHeight: 1.2, color: ink },
    styles: {
      h1: { fontSize: 16, bold: true, margin: [0, 2, 0, 6] },
      h2: { fontSize: 11, bold: true, margin: [0, 8, 0, 3] },
      h3: { fontSize: 9.5, bold: true, margin: [0, 3, 0, 1] },
      th: { bold: true, color: muted, fontSize: 8.5 },
    },
  };
}

const tableLayouts = {
  report: {
    hLineWidth: (i: number, node: { table: { body: unknown[] } }) => (i === 0 || i === 1 || i === node.table.body.length ? 0.6 : 0.3),
    vLineWidth: () => 0,
    hLineColor: () => rule,
    paddingLeft: () => 4,
    paddingRight: () => 4,
    paddingTop: () => 2,
    paddingBottom: () => 2,
  },
};

export interface PdfOptions {
  /**
   * The creation date written into the file. Defaults to the signing time for a signed report;
   * a preview without one gets 1970-01-01, so the same preview always gives the same bytes.
   */
  createdAt?: string | Date;
}

/**
 * Each rendered report publishes `{ durationMs, cpuMs, bytes }` here (Node's diagnostics_channel: free
 * when nobody listens), so a benchmark or a metrics exporter can time the PDF step inside a signature.
 * `cpuMs` is the process's CPU time meanwhile: the render's own when nothing else runs beside it (null
 * for a render in a rendering thread, see pdf-threads.ts, which publishes it on this thread).
 */
export const pdfRenderedChannel = diagnosticsChannel.channel('isobar:report-pdf-rendered');

const cpuMsSince = (start: NodeJS.CpuUsage) => {
  const d = process.cpuUsage(start);
  return (d.user + d.system) / 1000;
};

/** Renders the report as PDF bytes. */
export async function renderReportPdf(view: ReportView, options: PdfOptions = {}): Promise<Buffer> {
  const began = performance.now();
  const cpu = pdfRenderedChannel.hasSubscribers ? process.cpuUsage() : null;
  setUp();
  const created = new Date(options.createdAt ?? view.signature?.signedAtIso ?? 0);
  if (Number.isNaN(created.getTime())) throw new TypeError('renderReportPdf: createdAt is not a valid time.');
  const doc = reportDocument(view, created);
  const pdf = await pdfmake.createPdf(doc).getBuffer();
  if (cpu && pdfRenderedChannel.hasSubscribers) pdfRenderedChannel.publish({ durationMs: performance.now() - began, cpuMs: cpuMsSince(cpu), bytes: pdf.length });
  return pdf;
}
