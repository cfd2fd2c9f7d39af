import { smtpTransport } from './transport';
import type { DataSource } from 'typeorm';
import type { Task } from 'graphile-worker';
import { z } from 'zod';
import { ReportVersion } from '../db/entities/report-version.entity';
import { labSettings } from '../settings/queries/lab-settings';

export interface MailSettings {
  host: string;
  port: number;
  from: string;
  hospitalName: string;
}

const payloadSchema = z.object({ reportVersionId: z.uuid() });

/**
 * The referring clinician's notice that a report is signed and in the hospital record. It names the
 * accession number and the version, nothing else: no diagnosis, no measurements, no patient name, and
 * no link that would need an Isobar account. A failure throws, so the queue retries with backoff.
 */
export function sendReportNoticeTask(dataSource: DataSource, mail: MailSettings): Task {
  const transport = smtpTransport(mail);
  return async (payload) => {
    const { reportVersionId } = payloadSchema.parse(payload);
    const version = await dataSource.manager
      .createQueryBuilder(ReportVersion, 'v')
      .innerJoin('v.study', 's')
      .select(['v.id', 'v.versionNo', 'v.status', 's.id', 's.accession', 's.referringEmail'])
      .where('v.id = :reportVersionId', { reportVersionId })
      .getOne();
    const referringEmail = version?.study!.referringEmail;
    if (!version || !referringEmail) return; // nobody to tell
    const accession = version.study!.accession;
    const amended = version.status === 'amended';
    // The lab's sender when set (read at each send), else the configured one.
    const { mailFrom } = await labSettings(dataSource, { mailFrom: mail.from });
    await transport.sendMail({
      from: mailFrom,
      to: referringEmail,
      subject: `${amended ? 'Amended report' : 'Report'} signed: accession ${accession}`,
      text: [
        `The ${amended ? `amended report (version ${version.versionNo})` : 'report'} for accession number ${accession} has been signed.`,
        `It is available in the ${mail.hospitalName} patient record.`,
        '',
        'This notice contains no clinical information. Please read the report in the patient record.',
      ].join('\n'),
      headers: { 'X-Isobar-Report-Version': String(version.versionNo) },
    });
  };
}
