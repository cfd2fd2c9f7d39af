import { smtpTransport } from '../mail/transport';
import type { CronItem, Task } from 'graphile-worker';
import { Not, type DataSource } from 'typeorm';
import { z } from 'zod';
import { addJob } from '../jobs/queue';
import type { TurnaroundSettings } from '../../shared/settings/lab-settings';
import { labSettings } from '../settings/queries/lab-settings';
import { OverdueNotice } from '../db/entities/turnaround.entities';
import { User } from '../db/entities/user.entity';

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
    // SQL: one set-based INSERT … SELECT … ON CONFLICT DO NOTHING over the turnaround summary, with time arithmetic in the database.
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
  const transport = smtpTransport(mail);
  return async (payload) => {
    const { studyId } = payloadSchema.parse(payload);
    const notice = await dataSource.manager
      .createQueryBuilder(OverdueNotice, 'n')
      .select(['n.studyId', 'n.targetHours', 'n.sentAt'])
      .innerJoin('n.study', 's')
      .addSelect(['s.id', 's.accession'])
      .innerJoin('n.turnaround', 't')
      .addSelect(['t.studyId', 't.signedAt', 't.startedAt'])
      .leftJoin('n.physician', 'u')
      .addSelect(['u.id', 'u.email', 'u.displayName'])
      .where('n.studyId = :studyId', { studyId })
      .getOne();
    if (!notice || notice.sentAt || notice.turnaround!.signedAt) return;
    const accession = notice.study!.accession;
    const chiefs = await dataSource.manager.find(User, { where: { role: 'chief', email: Not('') }, select: { id: true, email: true }, order: { email: 'ASC' } });
    const to = notice.physician?.email ? [notice.physician.email] : [];
    const cc = [...new Set(chiefs.map((c) => c.email))].filter((e) => !to.includes(e));
    if (to.length + cc.length > 0) {
      const waited = (Date.now() - notice.turnaround!.startedAt.getTime()) / 3_600_000;
      await transport.sendMail({
        from: mail.from,
        to: to.length ? to : cc,
        cc: to.length ? cc : [],
        subject: `Overdue for signature: accession ${accession}`,
        text: [
          `The report for accession number ${accession} is not yet signed: it has waited ${waited.toFixed(1)} h, past the lab's ${notice.targetHours} h target.`,
          notice.physician?.displayName ? `Signature owner: ${notice.physician.displayName}.` : 'No physician is recorded for this study.',
          '',
          `Open the study: ${mail.publicUrl}/studies/${studyId}`,
          '',
          'This notice is sent once per study and contains no clinical information.',
        ].join('\n'),
        headers: { 'X-Isobar-Notice': 'overdue-signature' },
      });
    }
    await dataSource.manager.update(OverdueNotice, { studyId }, { sentAt: () => 'now()', recipients: to.length + cc.length });
  };
}
