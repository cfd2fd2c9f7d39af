import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';

/** One JSON line printed by tests/support/delivery-worker.ts. */
export interface WorkerEvent {
  pid: number;
  event: 'ready' | 'started' | 'finished' | 'failed' | 'crashed';
  id?: string;
  error?: string;
}

export interface WorkerProcess {
  pid: number;
  events: WorkerEvent[];
  /** Resolves with the first event that matches, or rejects after `timeoutMs`. */
  waitFor(match: (e: WorkerEvent) => boolean, timeoutMs?: number): Promise<WorkerEvent>;
  /** Sends the signal (SIGKILL after 10 s if the process is still there) and resolves once it has exited. */
  kill(signal: NodeJS.Signals): Promise<void>;
  exited: boolean;
}

/**
 * Starts the delivery worker (tests/support/delivery-worker.ts) as a child process, with the
 * test's environment plus `env`, and waits until it works the queue.
 */
export async function startWorkerProcess(env: Record<string, string>, readyTimeoutMs = 30_000): Promise<WorkerProcess> {
  const root = process.cwd();
  // `node --import tsx` rather than the tsx command, which runs the script in a second process: the
  // pid here must be the worker itself, so that SIGKILL kills the worker and not only a wrapper.
  const child: ChildProcess = spawn(process.execPath, ['--import', 'tsx', path.join(root, 'tests/support/delivery-worker.ts')], {
    cwd: root,
    env: { ...process.env, LOG_LEVEL: 'silent', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const events: WorkerEvent[] = [];
  const waiters = new Set<() => void>();
  let stderr = '';
  let buffered = '';
  child.stdout!.on('data', (chunk: Buffer) => {
    buffered += chunk.toString();
    let nl: number;
    while ((nl = buffered.indexOf('\n')) >= 0) {
      const line = buffered.slice(0, nl);
      buffered = buffered.slice(nl + 1);
      try {
        events.push(JSON.parse(line) as WorkerEvent);
      } catch {
        continue; // not one of ours
      }
      for (const w of waiters) w();
    }
  });
  child.stderr!.on('data', (chunk: Buffer) => {
    stderr = (stderr + chunk.toString()).slice(-4000);
  });
  const exit = new Promise<void>((resolve) => child.once('exit', () => resolve()));
  const handle: WorkerProcess = {
    pid: child.pid!,
    events,
    exited: false,
    waitFor(match, timeoutMs = 20_000) {
      return new Promise((resolve, reject) => {
        const check = () => {
          const found = events.find(match);
          if (found) {
            waiters.delete(check);
            clearTimeout(timer);
            resolve(found);
          } else if (handle.exited) {
            waiters.delete(check);
            clearTimeout(timer);
            reject(new Error(`worker ${child.pid} exited before the awaited event; stderr: ${stderr}`));
          }
        };
        const timer = setTimeout(() => {
          waiters.delete(check);
          reject(new Error(`worker ${child.pid}: no matching event within ${timeoutMs} ms; events: ${JSON.stringify(events.slice(-5))}; stderr: ${stderr}`));
        }, timeoutMs);
        waiters.add(check);
        check();
      });
    },
    async kill(signal) {
      if (!handle.exited) child.kill(signal);
      // A graceful stop that takes too long is cut short.
      const timer = setTimeout(() => child.kill('SIGKILL'), 10_000);
      await exit;
      clearTimeout(timer);
    },
  };
  void exit.then(() => {
    handle.exited = true;
    for (const w of waiters) w();
  });
  await handle.waitFor((e) => e.event === 'ready' || e.event === 'crashed', readyTimeoutMs);
  if (events.some((e) => e.event === 'crashed')) throw new Error(`worker did not start: ${JSON.stringify(events)} ${stderr}`);
  return handle;
}
