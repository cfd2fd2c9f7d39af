import { renderReportPdf, setUp } from './pdf';
import type { ReportView } from './view-model';

/** What a PDF rendering thread answers: the bytes and the render's own time. */
export interface RenderedInThread {
  pdf: Uint8Array;
  /** Milliseconds from the view received to the bytes ready (the PDF step alone). */
  durationMs: number;
}

export type PdfTask = { view: ReportView } | { warm: true };

/**
 * Renders one report in a rendering thread (see pdf-threads.ts); the bytes are copied back (about
 * 26 KB). `{ warm: true }` only loads this module and the fonts, so the first signature does not wait for them.
 */
export async function renderPdfTask(task: PdfTask): Promise<RenderedInThread | null> {
  if (!('view' in task)) {
    setUp();
    return null;
  }
  const { view } = task;
  const began = performance.now();
  const pdf = await renderReportPdf(view);
  return { pdf, durationMs: performance.now() - began };
}
