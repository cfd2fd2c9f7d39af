import nodemailer from 'nodemailer';

/**
 * The mail relay every notice goes through (`SMTP_HOST`, `SMTP_PORT`): plain SMTP to the hospital's
 * relay, no TLS negotiation, ten seconds to connect. One transport per task, reused for each send.
 */
export function smtpTransport(relay: { host: string; port: number }) {
  return nodemailer.createTransport({ host: relay.host, port: relay.port, secure: false, ignoreTLS: true, connectionTimeout: 10_000 });
}
