import { SMTPServer } from 'smtp-server';
import express from 'express';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';

export interface CaughtMail {
  id: number;
  from: string;
  to: string[];
  receivedAt: string;
  /** The raw message as received (headers and body). */
  raw: string;
}

/**
 * A local stand-in for the hospital's mail relay: accepts every message on loopback without
 * authentication, keeps what it receives in memory, and lists it at `GET /messages` on a small HTTP
 * port (the admin's development page reads it). `setDown(true)` refuses connections' mail, to test
 * the queue's retries.
 */
export async function startFakeSmtp(options: { port: number; httpPort: number; host?: string }) {
  const host = options.host ?? '127.0.0.1';
  const caught: CaughtMail[] = [];
  let down = false;
  const smtp = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    onMailFrom(_address, _session, callback) {
      if (down) return callback(Object.assign(new Error('Mail service temporarily unavailable'), { responseCode: 421 }));
      callback();
    },
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (c: Buffer) => chunks.push(c));
      stream.on('end', () => {
        caught.push({
          id: caught.length + 1,
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
          to: session.envelope.rcptTo.map((r) => r.address),
          receivedAt: new Date().toISOString(),
          raw: Buffer.concat(chunks).toString('utf8'),
        });
        callback();
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    smtp.once('error', reject);
    smtp.listen(options.port, host, () => resolve());
  });
  const app = express();
  app.get('/messages', (_req, res) => void res.json({ items: [...caught].reverse() }));
  const http: Server = await new Promise((resolve) => {
    const s = app.listen(options.httpPort, host, () => resolve(s));
  });
  return {
    /** The port it listens on (the one asked for, or the one the system chose for port 0). */
    port: (smtp.server.address() as AddressInfo).port,
    listUrl: `http://${host}:${(http.address() as { port: number }).port}/messages`,
    caught,
    setDown(value: boolean) {
      down = value;
    },
    async close() {
      await new Promise<void>((resolve) => smtp.close(() => resolve()));
      await new Promise<void>((resolve) => http.close(() => resolve()));
    },
  };
}
