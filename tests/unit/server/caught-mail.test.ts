import nodemailer from 'nodemailer';
import type Mail from 'nodemailer/lib/mailer';
import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../../server/config';
import { decodeWords, readMessage } from '../../../server/mail/read-message';

// Messages as nodemailer writes them (RFC 5322 headers, RFC 2047 encoded words, RFC 2045 transfer
// encodings), read back for the development page that lists caught mail.

async function raw(message: Mail.Options): Promise<string> {
  const transport = nodemailer.createTransport({ streamTransport: true, buffer: true, newline: 'unix' });
  const info = await transport.sendMail({ from: 'Isobar reports <isobar@localhost>', to: 'referrer@clinic.example', ...message });
  return (info.message as Buffer).toString('utf8');
}

describe('readMessage', () => {
  it('reads subject, headers and a plain ASCII body', async () => {
    const m = readMessage(await raw({ subject: 'Report signed: accession SBR-26-0411', text: 'The report for accession number SBR-26-0411 has been signed.\nSecond line.', headers: { 'X-Isobar-Report-Version': '1' } }));
    expect(m.subject).toBe('Report signed: accession SBR-26-0411');
    expect(m.text).toBe('The report for accession number SBR-26-0411 has been signed.\nSecond line.');
    expect(m.headers.find((h) => h.name === 'X-Isobar-Report-Version')?.value).toBe('1');
    expect(m.date).toBeTruthy();
  });

  it('decodes non-ASCII subjects and quoted-printable or base64 bodies', async () => {
    const text = `Hôpital Saint-Ève · Laboratoire — ${'long line of text '.repeat(8)}end`;
    const m = readMessage(await raw({ subject: 'Rapport signé · accession Ø-1', text }));
    expect(m.subject).toBe('Rapport signé · accession Ø-1');
    expect(m.text).toBe(text);
    const b64 = readMessage(await raw({ subject: 'x', text: 'Ünïcode body', textEncoding: 'base64' }));
    expect(b64.text).toBe('Ünïcode body');
  });

  it('takes the plain-text part of a multipart message', async () => {
    const m = readMessage(await raw({ subject: 'Both', text: 'Plain words.', html: '<p>Markup words.</p>' }));
    expect(m.text).toBe('Plain words.');
  });

  it('decodes Q and B encoded words, joining adjacent ones', () => {
    expect(decodeWords('=?UTF-8?Q?Caf=C3=A9_au_lait?=')).toBe('Café au lait');
    expect(decodeWords('=?UTF-8?B?w4lw?= =?UTF-8?Q?=C3=A9e?=')).toBe('Épée');
    expect(decodeWords('plain')).toBe('plain');
  });
});

describe('where caught mail can be listed', () => {
  it('locally the mail stand-in’s list on its HTTP port, when the page is asked for', () => {
    expect(loadConfig({ CAUGHT_MAIL_PAGE: 'on' }).mail.caughtMailUrl).toBe('http://127.0.0.1:8426/messages');
    expect(loadConfig({ CAUGHT_MAIL_PAGE: 'on', FAKE_SMTP_HTTP_PORT: '9001', SMTP_HOST: 'localhost' }).mail.caughtMailUrl).toBe('http://localhost:9001/messages');
  });
  it('nowhere unless asked for: a local relay alone does not open the page', () => {
    expect(loadConfig({}).mail.caughtMailUrl).toBeNull();
    expect(loadConfig({ CAUGHT_MAIL_PAGE: 'off' }).mail.caughtMailUrl).toBeNull();
  });
  it('nowhere in production, with real services, or with a relay that is not on this machine', () => {
    expect(loadConfig({ CAUGHT_MAIL_PAGE: 'on', NODE_ENV: 'production', SESSION_SECRET: 'x'.repeat(40) }).mail.caughtMailUrl).toBeNull();
    expect(loadConfig({ CAUGHT_MAIL_PAGE: 'on', ISOBAR_NO_FAKES: '1' }).mail.caughtMailUrl).toBeNull();
    expect(loadConfig({ CAUGHT_MAIL_PAGE: 'on', SMTP_HOST: 'relay.hospital.example' }).mail.caughtMailUrl).toBeNull();
  });
});
