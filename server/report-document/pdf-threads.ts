import { availableParallelism } from 'node:os';
import { Piscina } from 'piscina';
import { ServiceNotAnsweringError } from '../errors';
import { defaultLogger, safeError } from '../log';
import { pdfRenderedChannel } from './pdf';
import type { RenderedInThread } from './pdf-thread-task';
import type { ReportView } from './view-model';

/**
 * Signed PDFs are rendered in worker threads (piscina), so a signature's PDF — about 15 ms of CPU —
 * neither blocks the server's event loop (other users' requests go on) nor holds up the signature's
 * other work, which runs beside it. One thread per core beyond the first (which the event loop and
 * PostgreSQL share), at most two; the signing slots bound how many renders wait.
 */
let pool: Piscina | null = null;
const threadCount = Math.max(1, Math.min(2, availableParallelism() - 1));

/** A render takes tens of milliseconds; one still running after this is stopped, its thread replaced. */
export const PDF_RENDER_TIMEOUT_MS = 20_000;

function threads(): Piscina {
  if (!pool) {
    pool = new Piscina({ filename: new URL('./pdf-thread.mjs', import.meta.url).href, minThreads: threadCount, maxThreads: threadCount });
    // A thread that fails outside a task (one that cannot start, say) is reported here; unheard, the
    // event would end the process. The next render starts a thread again.
    pool.on('error', (error: unknown) => defaultLogger().error({ err: safeError(error) }, 'a PDF rendering thread failed'));
  }
  return pool;
}

/**
 * The report's PDF rendered in a thread: the same bytes as `renderReportPdf` in this thread (tested).
 * The view is copied to the thread when the task is posted; nothing changes it meanwhile. Publishes
 * the render's own time on `pdfRenderedChannel` (`cpuMs` is null: a thread's CPU time is not
 * measurable apart from the process's in this Node version).
 */
export async function renderPdfInThread(view: ReportView, timeoutMs = PDF_RENDER_TIMEOUT_MS): Promise<Buffer> {
  let rendered: RenderedInThread;
  try {
    rendered = await threads().run({ view }, { signal: AbortSignal.timeout(timeoutMs) });
  } catch (error) {
    if ((error as Error)?.name === 'AbortError' || (error as Error)?.name === 'TimeoutError') {
      throw new ServiceNotAnsweringError(`The report's PDF was not rendered within ${Math.round(timeoutMs / 1000)} s; nothing was signed. Try again.`);
    }
    throw error;
  }
  const bytes = Buffer.from(rendered.pdf.buffer, rendered.pdf.byteOffset, rendered.pdf.byteLength);
  if (pdfRenderedChannel.hasSubscribers) pdfRenderedChannel.publish({ durationMs: rendered.durationMs, cpuMs: null, bytes: bytes.length });
  return bytes;
}

/** Starts the rendering threads and loads their fonts, so the first signature does not wait for them. */
export async function warmPdfThreads(): Promise<void> {
  await Promise.all(Array.from({ length: threadCount }, () => threads().run(null, { name: 'warm' })));
}

/** Ends the rendering threads (at shutdown; the next render starts them again). */
export async function closePdfThreads(): Promise<void> {
  const ending = pool;
  pool = null;
  await ending?.destroy();
}
