/**
 * The report narrative as structured data: sections of headings, paragraphs, lists, label/value pairs
 * and tables, every piece a plain string. The preview pane lays it out as text components, so
 * nothing in it (the physician's free text included) is ever parsed as markup by the browser.
 * Built on the server from the same view model, in the same order, as the Handlebars narrative.
 */

import type { Flag } from '../physiology/types';

export interface ReportCell {
  text: string;
  flag?: Flag;
  /** The flag in words (shown beside the value when it is not normal). */
  flagText?: string;
}

export type ReportBlock =
  | { kind: 'paragraph'; text: string; strong?: boolean }
  | { kind: 'subheading'; text: string }
  | { kind: 'list'; items: string[] }
  | { kind: 'fields'; items: Array<{ label: string; value: string }> }
  /** The first cell of each row names the row. */
  | { kind: 'table'; columns: string[]; rows: ReportCell[][] }
  | { kind: 'caution'; text: string };

export interface ReportSection {
  /** Stable name of the section (identification, indication, technique, measurements, …). */
  key: string;
  heading: string | null;
  blocks: ReportBlock[];
}

export interface ReportDocument {
  templateVersion: string;
  title: string;
  /** Hospital and lab, when configured. */
  source: string | null;
  sections: ReportSection[];
  /** "Preview: not signed." or the signature line. */
  footer: string[];
}

/** Every string a document shows, in reading order (for tests and for a plain-text copy). */
export function documentStrings(doc: ReportDocument): string[] {
  const out: string[] = [];
  if (doc.source) out.push(doc.source);
  out.push(doc.title);
  for (const s of doc.sections) {
    if (s.heading) out.push(s.heading);
    for (const b of s.blocks) {
      switch (b.kind) {
        case 'paragraph':
        case 'subheading':
        case 'caution':
          out.push(b.text);
          break;
        case 'list':
          out.push(...b.items);
          break;
        case 'fields':
          for (const f of b.items) out.push(f.label, f.value);
          break;
        case 'table':
          out.push(...b.columns);
          for (const r of b.rows) for (const c of r) out.push(c.text);
          break;
      }
    }
  }
  out.push(...doc.footer);
  return out;
}
