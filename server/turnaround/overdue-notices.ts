import nodemailer from 'nodemailer';
import type { CronItem, Task } from 'graphile-worker';
import type { DataSource } from 'typeorm';
import { z } from 'zod';
import { addJob } from '../jobs/queue';
import type { TurnaroundSettings } from './settings';
import { labSettings } from '../settings/lab-settings';

/** How far back a study's deadline may lie and still get a notice (older ones are on the chief's list already). */
export const noticeLookbackHours = 14 * 24;

/**
 * Finds studies that passed their signature target unsigned and have had no notice, records one
 * notice each and queues its mail, in one transaction: the notice's key (the study) makes a second
 * one impossible, so a repeated run, a second worker or a restart never mails again.
 * Returns the studies newly noticed.
 */
export async function queueOverdueNotices(db: DataSource, settings: TurnaroundSettings, now = new Date()): Promise<string[]> {
  return db.transaction(async (tx) => {
    const rows: { study_id: string }[] = await tx.query(
      `INSERT INTO overdue_notice (study_id, physician_id, target_hours, due_at)
       SELECT t.study_id, t.physician_id, $2::numeric, t.started_at + make_interval(secs => $2::float8 * 3600)
       FROM study_turnaround t
       WHERE t.signed_at IS NULL
         AND t.started_at < $1::timestamptz - make_interval(secs => $2::float8 * 3600)
         AND t.started_at >= $1::timestamptz - make_interval(secs => ($2::float8 + $3::float8) * 3600)
         AND NOT EXISTS (SELECT 1 FROM overdue_notice n WHERE n.study_id = t.study_id)
       ORDER BY t.started_at
       ON CONFLICT (study_id) DO NOTHING
       RETURNING study_id`,
      [now, settings.signatureTargetHours, noticeLookbackHours],
    );
    for (const { study_id } of rows) {
      await addJob(tx, 'send-overdue-notice', { studyId: study_id }, { jobKey: `overdue-notice:${study_id}`, maxAttempts: 10 });
    }
    return rows.map((r) => r.study_id);
  });
}

/** The recurring check, every five minutes, run by the job queue's scheduler (one run per slot across workers). */
export const overdueCronItems: CronItem[] = [
  { task: 'queue-overdue-notices', match: '*/5 * * * *', identifier: 'queue-overdue-notices', options: { backfillPeriod: 0, maxAttempts: 3 } },
];

export function queueOverdueNoticesTask(dataSource: DataSource): Task {
  return async () => {
    await queueOverdueNotices(dataSource, await labSettings(dataSource));
  };
}

export interface OverdueMailSettings {
  host: string;
  port: number;
  from: string;
  /** Where the study opens (the public URL of Isobar). */
  publicUrl: string;
}

const payloadSchema = z.object({ studyId: z.uuid() });

/**
 * The one notice: to the physician who owns the signature, copied to the department chiefs. It names
 * the accession number, how long the study has waited and the link to it (both readers have accounts);
 * no patient name and no findings. A study signed in the meantime gets no mail. A failure throws, so
 * the queue retries with backoff.
 */
export function sendOverdueNoticeTask(dataSource: DataSource, mail: OverdueMailSettings): Task {
  const transport = nodemailer.createTransport({ host: mail.host, port: mail.port, secure: false, ignoreTLS: true, connectionTimeout: 10_000 });
  return async (payload) => {
    const { studyId } = payloadSchema.parse(payload);
    const [row] = await dataSource.query(
      `SELECT s.accession, n.due_at, n.target_hours, n.sent_at, t.signed_at, t.started_at, u.email AS owner_email, u.display_name AS owner_name
       FROM overdue_notice n JOIN study s ON s.id = n.study_id JOIN study_turnaround t ON t.study_id = n.study_id
       LEFT JOIN app_user u ON u.id = n.physician_id
       WHERE n.study_id = $1`,
      [studyId],
    );
    if (!row || row.sent_at || row.signed_at) return;
    const chiefs: { email: string }[] = await dataSource.query(`SELECT DISTINCT email FROM app_user WHERE role = 'chief' AND email IS NOT NULL AND email <> '' ORDER BY email`);
    const to = row.owner_email ? [row.owner_email as string] : [];
    const cc = chiefs.map((c) => c.email).filter((e) => !to.includes(e));
    if (to.length + cc.length > 0) {
      const waited = (Date.now() - (row.started_at as Date).getTime()) / 3_600_000;
      await transport.sendMail({
        from: mail.from,
        to: to.length ? to : cc,
        cc: to.length ? cc : [],
        subject: `Overdue for signature: accession ${row.accession}`,
        text: [
          `The report for accession number ${row.accession} is not yet signed: it has waited ${waited.toFixed(1)} h, past the lab's ${Number(row.target_hours)} h target.`,
          row.owner_name ? `Signature owner: ${row.owner_name}.` : 'No physician is recorded for this study.',
          '',
          `Open the study: ${mail.publicUrl}/studies/${studyId}`,
          '',
          'This notice is sent once per study and contains no clinical information.',
        ].join('\n'),
        headers: { 'X-Isobar-Notice': 'overdue-signature' },
      });
    }
    await dataSource.query(`UPDATE overdue_notice SET sent_at = now(), recipients = $2 WHERE study_id = $1`, [studyId, to.length + cc.length]);
  };
}
