import net from 'node:net';
import type { AddressInfo } from 'node:net';

/**
 * A loopback TCP proxy to a real server that a test can cut, to see how the app behaves
 * when its database goes away after start-up.
 */
export async function startTcpProxy(targetHost: string, targetPort: number) {
  const sockets = new Set<net.Socket>();
  let open = true;
  const server = net.createServer((client) => {
    if (!open) return client.destroy();
    const upstream = net.connect(targetPort, targetHost);
    for (const s of [client, upstream]) {
      sockets.add(s);
      s.on('close', () => sockets.delete(s));
      s.on('error', () => s.destroy());
    }
    client.pipe(upstream).pipe(client);
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  return {
    port: (server.address() as AddressInfo).port,
    /** Drops every connection and refuses new ones. */
    cut() {
      open = false;
      for (const s of sockets) s.destroy();
    },
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
