import { availableParallelism } from 'node:os';
import { Piscina } from 'piscina';
import { pdfRenderedChannel } from './pdf';
import type { PdfTask, RenderedInThread } from './pdf-thread-task';
import type { ReportView } from './view-model';

/**
 * Signed PDFs are rendered in worker threads (piscina), so a signature's PDF — about 15 ms of CPU —
 * neither blocks the server's event loop (other users' requests go on) nor holds up the signature's
 * other work, which runs beside it. At most one thread per core (the signing slots bound how many wait).
 */
let pool: Piscina<PdfTask, RenderedInThread | null> | null = null;
const threadCount = Math.max(1, Math.min(2, availableParallelism() - 1)); // a core is left to the event loop and PostgreSQL

function threads(): Piscina<PdfTask, RenderedInThread | null> {
  pool ??= new Piscina({
    filename: new URL('./pdf-thread.mjs', import.meta.url).href,
    minThreads: threadCount,
    maxThreads: threadCount,
    // A thread loads the fonts once and keeps them; an idle one is kept a while for the next signature.
    idleTimeout: 10 * 60_000,
  });
  return pool;
}

/**
 * The report's PDF rendered in a thread: the same bytes as `renderReportPdf` in this thread (tested).
 * Publishes the render's own time on `pdfRenderedChannel` (`cpuMs` is null: a thread's CPU time is
 * not measurable apart from the process's in this Node version).
 */
export async function renderPdfInThread(view: ReportView): Promise<Buffer> {
  const rendered = await threads().run({ view });
  if (!rendered) throw new Error('The PDF thread answered without a PDF.');
  const { pdf, durationMs } = rendered;
  const bytes = Buffer.from(pdf.buffer, pdf.byteOffset, pdf.byteLength);
  if (pdfRenderedChannel.hasSubscribers) pdfRenderedChannel.publish({ durationMs, cpuMs: null, bytes: bytes.length });
  return bytes;
}

/** Starts the rendering threads and loads their fonts, so the first signature does not wait for them. */
export async function warmPdfThreads(): Promise<void> {
  await Promise.all(Array.from({ length: threadCount }, () => threads().run({ warm: true })));
}

/** Ends the rendering threads (at shutdown; the next render starts them again). */
export async function closePdfThreads(): Promise<void> {
  const ending = pool;
  pool = null;
  await ending?.destroy();
}
