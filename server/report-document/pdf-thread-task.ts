import { renderReportPdf, setUp } from './pdf';
import type { ReportView } from './view-model';

/** What a PDF rendering thread answers: the bytes and the render's own time. */
export interface RenderedInThread {
  pdf: Uint8Array;
  /** Milliseconds from the view received to the bytes ready (the PDF step alone). */
  durationMs: number;
}

/** Renders one report in a rendering thread (see pdf-threads.ts); the bytes are copied back (about 26 KB). */
export async function renderPdfTask({ view }: { view: ReportView }): Promise<RenderedInThread> {
  const began = performance.now();
  const pdf = await renderReportPdf(view);
  return { pdf, durationMs: performance.now() - began };
}

/** Loads this module and the fonts in a rendering thread, so the first signature does not wait for them. */
export function warmPdfTask(): void {
  setUp();
}
