import type { TaskList } from './worker';

/**
 * The server's tasks by name. Features add theirs here (a report to render, a notice to send);
 * `addJob(manager, name, payload)` enqueues one inside a transaction.
 */
export const taskList: TaskList = {};
