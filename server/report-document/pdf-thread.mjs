// The entry of a PDF rendering thread (see pdf-threads.ts). Worker threads do not inherit the
// TypeScript loader the server runs under, so this plain module registers it for the thread, then
// loads the task written in TypeScript. Its default export is the task the thread pool calls.
import { register } from 'tsx/esm/api';

register();
const { renderPdfTask } = await import('./pdf-thread-task.ts');
export default renderPdfTask;
