import { execFileSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';

/**
 * A private PostgreSQL cluster a test may stop and start at will (an outage, a restart), listening
 * on loopback only. Runs PostgreSQL's programs as the `postgres` user when the tests run as root
 * (initdb refuses root), like scripts/lib.sh.
 */
export interface PrivateCluster {
  port: number;
  dir: string;
  /** A URL for a database in this cluster, as the given role. */
  url(database: string, role?: string): string;
  psql(sql: string, database?: string): string;
  stop(): void;
  start(): void;
  remove(): void;
}

const pgBin = () => {
  const dirs = fs.readdirSync('/usr/lib/postgresql').sort((a, b) => Number(a) - Number(b));
  return `/usr/lib/postgresql/${dirs[dirs.length - 1]}/bin`;
};
const isRoot = () => process.getuid?.() === 0;
const asPg = (cmd: string, args: string[]) =>
  execFileSync(isRoot() ? 'runuser' : cmd, isRoot() ? ['-u', 'postgres', '--', cmd, ...args] : args, { stdio: ['ignore', 'pipe', 'pipe'], cwd: '/' }).toString();

/**
 * Where a private cluster can live: the project's .data, unless the postgres user cannot reach it
 * (a clone inside a 0700 temporary folder), then a folder in /var/tmp — as scripts/lib.sh does.
 */
function clusterBase(): string {
  const local = path.resolve('.data');
  fs.mkdirSync(local, { recursive: true });
  if (!isRoot()) return local;
  try {
    execFileSync('runuser', ['-u', 'postgres', '--', 'test', '-x', local], { cwd: '/' });
    return local;
  } catch {
    const dir = fs.mkdtempSync('/var/tmp/isobar-test-');
    fs.chmodSync(dir, 0o755);
    return dir;
  }
}

async function freePort(): Promise<number> {
  const server = net.createServer();
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as net.AddressInfo;
  await new Promise<void>((resolve) => server.close(() => resolve()));
  return port;
}

export async function createPrivateCluster(name: string): Promise<PrivateCluster> {
  const bin = pgBin();
  const dir = path.join(clusterBase(), `${name}-${process.pid}`);
  fs.rmSync(dir, { recursive: true, force: true });
  fs.mkdirSync(dir, { recursive: true, mode: 0o700 });
  if (isRoot()) execFileSync('chown', ['postgres:postgres', dir]);
  asPg(`${bin}/initdb`, ['-D', dir, '-U', 'postgres', '--auth=trust', '--encoding=UTF8', '--locale=C.UTF-8']);
  const port = await freePort();
  const cluster: PrivateCluster = {
    port,
    dir,
    url: (database, role = 'postgres') => `postgres://${role}@127.0.0.1:${port}/${database}`,
    psql: (sql, database = 'postgres') =>
      execFileSync(`${bin}/psql`, ['-h', '127.0.0.1', '-p', String(port), '-U', 'postgres', '-d', database, '-v', 'ON_ERROR_STOP=1', '-qtAc', sql]).toString(),
    stop: () => void asPg(`${bin}/pg_ctl`, ['-D', dir, '-m', 'fast', '-w', 'stop']),
    start: () =>
      void asPg(`${bin}/pg_ctl`, ['-D', dir, '-l', path.join(dir, 'server.log'), '-w', '-t', '30', '-o', `-c listen_addresses=127.0.0.1 -p ${port} -k ${dir} -c fsync=off`, 'start']),
    remove: () => {
      try {
        cluster.stop();
      } catch {
        /* already stopped */
      }
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
  cluster.start();
  return cluster;
}
