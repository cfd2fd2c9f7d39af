import { smtpTransport } from './transport';
import { And, IsNull, Not, type DataSource } from 'typeorm';
import type { Task } from 'graphile-worker';
import { z } from 'zod';
import { ReportDelivery } from '../db/entities/report-delivery.entity';
import { User } from '../db/entities/user.entity';
import { labSettings } from '../settings/queries/lab-settings';

const payloadSchema = z.object({ reportVersionId: z.uuid() });

/**
 * Tells the administrators, once, that a report's delivery to the EHR has stopped (the EHR refused it,
 * or the retries ran out). It says what their delivery list says — accession, version, status and the
 * EHR's answer — and nothing clinical. Queued in the same statement that stops the delivery.
 */
export function sendDeliveryFailureNoticeTask(dataSource: DataSource, mail: { host: string; port: number; from: string }): Task {
  const transport = smtpTransport(mail);
  return async (payload) => {
    const { reportVersionId } = payloadSchema.parse(payload);
    const delivery = await dataSource.manager
      .createQueryBuilder(ReportDelivery, 'd')
      .innerJoin('d.reportVersion', 'v')
      .innerJoin('v.study', 's')
      .select(['d.id', 'd.status', 'd.lastError', 'd.httpStatus', 'v.id', 'v.versionNo', 's.id', 's.accession'])
      .where('d.reportVersionId = :reportVersionId', { reportVersionId })
      .getOne();
    if (!delivery || (delivery.status !== 'rejected' && delivery.status !== 'given-up')) return; // sent again meanwhile
    const admins = await dataSource.manager.find(User, { select: { id: true, email: true }, where: { role: 'admin', email: And(Not(IsNull()), Not('')) }, order: { email: 'ASC' } });
    if (admins.length === 0) return;
    const row = { accession: delivery.reportVersion!.study!.accession, versionNo: delivery.reportVersion!.versionNo };
    const what = delivery.status === 'rejected' ? `The EHR refused the report${delivery.httpStatus ? ` (HTTP ${delivery.httpStatus})` : ''}` : 'The EHR could not be reached before the delivery time limit';
    // The lab's sender when set (read at each send), else the configured one.
    const { mailFrom } = await labSettings(dataSource, { mailFrom: mail.from });
    await transport.sendMail({
      from: mailFrom,
      to: admins.map((a) => a.email),
      subject: `EHR delivery stopped: accession ${row.accession}, version ${row.versionNo}`,
      text: [
        `${what}: accession ${row.accession}, report version ${row.versionNo}.`,
        `The EHR's answer: ${delivery.lastError ?? 'none'}`,
        '',
        'Open "EHR delivery" in Isobar to see the issues and send the report again.',
      ].join('\n'),
    });
  };
}
