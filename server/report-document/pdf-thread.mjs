// The entry of a PDF rendering thread (see pdf-threads.ts). Worker threads do not inherit the
// TypeScript loader the server runs under, so this plain module registers it for the thread, then
// loads the tasks written in TypeScript: the default export renders, `warm` only loads the fonts.
import { register } from 'tsx/esm/api';

register();
const tasks = await import('./pdf-thread-task.ts');
export default tasks.renderPdfTask;
export const warm = tasks.warmPdfTask;
