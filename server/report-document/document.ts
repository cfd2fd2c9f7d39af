import type { ReportBlock, ReportDocument, ReportSection } from '../../shared/report/document';
import { versionNumber } from './template-versions';
import type { ReportView } from './view-model';

/**
 * The narrative as a structured document (`shared/report/document.ts`) for the live preview: the
 * sections, headings and order of the Handlebars templates in `templates/report/<version>/`, built
 * from the same view model. Values stay plain strings; the client lays them out as text.
 */
export function reportDocument(view: ReportView): ReportDocument {
  const sections: ReportSection[] = [];
  const add = (key: string, heading: string | null, blocks: Array<ReportBlock | null | false>) => {
    const kept = blocks.filter((b): b is ReportBlock => !!b);
    if (kept.length) sections.push({ key, heading, blocks: kept });
  };
  const paragraphs = (xs: string[]): ReportBlock[] => xs.map((text) => ({ kind: 'paragraph', text }));

  const a = view.amendment;
  if (a) {
    add('amendment', `Amended report${view.signature ? ` — version ${view.signature.reportVersion}` : ''}`, [
      { kind: 'paragraph', text: a.supersedes, strong: true },
      !!a.reason && { kind: 'paragraph', text: `Reason: ${a.reason}` },
      a.changes.length > 0 && { kind: 'subheading', text: 'Changed' },
      a.changes.length > 0 && { kind: 'list', items: a.changes },
    ]);
  }
  add('identification', null, [view.identification.length > 0 && { kind: 'fields', items: view.identification.map((i) => ({ label: i.label, value: i.value })) }]);
  if (view.indication.text || view.indication.question) {
    add('indication', 'Indication', [
      !!view.indication.text && { kind: 'paragraph', text: view.indication.text },
      !!view.indication.question && { kind: 'paragraph', text: `Clinical question: ${view.indication.question}` },
    ]);
  }
  add('technique', 'Procedure and technique', paragraphs(view.technique));
  if (view.measurements) add('measurements', 'Measurements', [{ kind: 'table', columns: view.measurements.columns, rows: view.measurements.rows }]);
  if (view.indices) {
    // From template v4 the indices table marks a vessel whose drift check failed and explains the mark below.
    const marks = versionNumber(view.templateVersion) >= 4;
    const rows = marks ? view.indices.rows.map((r) => r.map(({ mark, ...c }) => (mark ? { ...c, text: `${c.text} ${mark}` } : c))) : view.indices.rows;
    add('indices', 'Calculated indices', [
      { kind: 'table', columns: view.indices.columns, rows },
      ...(marks ? paragraphs(view.indices.footnotes ?? []) : []),
    ]);
  }
  add(
    'interpretation',
    'Interpretation by vessel',
    view.interpretation.flatMap((v): ReportBlock[] => [{ kind: 'subheading', text: v.vessel }, { kind: 'list', items: v.sentences }]),
  );
  const ach = view.acetylcholine;
  if (ach) {
    add('acetylcholine', 'Acetylcholine testing', [
      { kind: 'paragraph', text: ach.protocol },
      ach.doses.length > 0 && { kind: 'table', columns: ach.doseColumns.map((c) => c.label), rows: ach.doses.map((d) => ach.doseColumns.map((c) => ({ text: d[c.key] }))) },
      !!ach.result && { kind: 'paragraph', text: ach.result },
      !!ach.reversal && { kind: 'paragraph', text: ach.reversal },
    ]);
  }
  if (view.endotype) {
    add('endotype', 'Diagnosis: coronary function', [
      { kind: 'paragraph', text: view.endotype.label, strong: true },
      !!view.endotype.headline && { kind: 'paragraph', text: view.endotype.headline },
      view.endotype.reasons.length > 0 && { kind: 'subheading', text: 'Reasons' },
      view.endotype.reasons.length > 0 && { kind: 'list', items: view.endotype.reasons },
    ]);
  }
  add('conclusion', 'Conclusion', paragraphs(view.lesionSummary));
  add('quality', 'Measurement quality', [view.quality.length > 0 && { kind: 'list', items: view.quality }]);
  add('complications', 'Complications', paragraphs(view.complications));
  add('impression', 'Impression', paragraphs(view.impression));
  add('plan', 'Recommendations and plan', paragraphs(view.plan));
  add('thresholds', 'Thresholds applied', [
    view.thresholds.length > 0 && { kind: 'table', columns: ['Criterion', 'Value', 'Source'], rows: view.thresholds.map((t) => [{ text: t.label }, { text: t.value }, { text: t.source }]) },
  ]);
  add('caution', null, [{ kind: 'caution', text: view.caution }]);

  const sig = view.signature;
  const footer = sig
    ? [
        `Electronically signed by ${sig.signedBy} on ${sig.signedAt}. Report version ${sig.reportVersion}. Content fingerprint ${sig.shortFingerprint}.`,
        ...(sig.amendmentReason ? [`Addendum: ${sig.amendmentReason}`] : []),
      ]
    : ['Preview: not signed.'];
  footer.push(`Report template ${view.templateVersion}`);
  return {
    templateVersion: view.templateVersion,
    title: view.title,
    source: view.hospital ? `${view.hospital.name} · ${view.hospital.lab}` : null,
    sections,
    footer,
  };
}
