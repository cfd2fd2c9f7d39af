/**
 * How many signatures run their transaction at once in this process. A signature holds a database
 * connection and the study's row lock while its PDF renders, and rendering is CPU work for the few
 * rendering threads (server/report-document/pdf-threads.ts): more at once would not finish sooner, only
 * hold more connections, and twenty physicians signing together could leave other requests waiting for
 * the pool. Further signers wait here, in memory and without a connection, in the order they came.
 */
export const SIGNING_SLOTS = 2;

export interface Slots {
  run<T>(work: () => Promise<T>): Promise<T>;
  /** Signatures waiting for a slot (for tests and metrics). */
  readonly waiting: number;
}

export function slots(size: number): Slots {
  let busy = 0;
  const queue: Array<() => void> = [];
  const release = () => {
    const next = queue.shift();
    if (next) next();
    else busy--;
  };
  return {
    async run<T>(work: () => Promise<T>): Promise<T> {
      if (busy < size) busy++;
      else await new Promise<void>((resolve) => queue.push(resolve));
      try {
        return await work();
      } finally {
        release();
      }
    },
    get waiting() {
      return queue.length;
    },
  };
}
