import nodemailer from 'nodemailer';
import type { DataSource } from 'typeorm';
import type { Task } from 'graphile-worker';
import { z } from 'zod';
import { labSettings } from '../settings/lab-settings';

const payloadSchema = z.object({ reportVersionId: z.uuid() });

/**
 * Tells the administrators, once, that a report's delivery to the EHR has stopped (the EHR refused it,
 * or the retries ran out). It says what their delivery list says — accession, version, status and the
 * EHR's answer — and nothing clinical. Queued in the same statement that stops the delivery.
 */
export function sendDeliveryFailureNoticeTask(dataSource: DataSource, mail: { host: string; port: number; from: string }): Task {
  const transport = nodemailer.createTransport({ host: mail.host, port: mail.port, secure: false, ignoreTLS: true, connectionTimeout: 10_000 });
  return async (payload) => {
    const { reportVersionId } = payloadSchema.parse(payload);
    const [row] = await dataSource.query(
      `SELECT s.accession, v.version_no, d.status, d.last_error, d.http_status
         FROM report_delivery d JOIN report_version v ON v.id = d.report_version_id JOIN study s ON s.id = v.study_id
        WHERE d.report_version_id = $1`,
      [reportVersionId],
    );
    if (!row || (row.status !== 'rejected' && row.status !== 'given-up')) return; // sent again meanwhile
    const admins: Array<{ email: string }> = await dataSource.query(`SELECT email FROM app_user WHERE role = 'admin' AND email IS NOT NULL AND email <> '' ORDER BY email`);
    if (admins.length === 0) return;
    const what = row.status === 'rejected' ? `The EHR refused the report${row.http_status ? ` (HTTP ${row.http_status})` : ''}` : 'The EHR could not be reached before the delivery time limit';
    // The lab's sender when set (read at each send), else the configured one.
    const { mailFrom } = await labSettings(dataSource, { mailFrom: mail.from });
    await transport.sendMail({
      from: mailFrom,
      to: admins.map((a) => a.email),
      subject: `EHR delivery stopped: accession ${row.accession}, version ${row.version_no}`,
      text: [
        `${what}: accession ${row.accession}, report version ${row.version_no}.`,
        `The EHR's answer: ${row.last_error ?? 'none'}`,
        '',
        'Open "EHR delivery" in Isobar to see the issues and send the report again.',
      ].join('\n'),
    });
  };
}
