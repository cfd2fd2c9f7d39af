import type { DataSource } from 'typeorm';
import type { StudyDelivery } from '../../shared/delivery/status';
import { recordAudit, type AuditActor } from '../audit/audit';
import { Study } from '../db/entities/study.entity';
import { RecordNotFoundError } from '../errors';
import { listStudyDeliveries } from './queries/deliveries';

/** The EHR delivery of each signed version of a study, the read recorded in the audit trail. */
export async function readStudyDeliveries(dataSource: DataSource, studyId: string, actor: AuditActor): Promise<StudyDelivery[]> {
  if (!(await dataSource.manager.exists(Study, { where: { id: studyId } }))) throw new RecordNotFoundError('No study has this id.');
  const deliveries = await listStudyDeliveries(dataSource, studyId);
  await recordAudit(dataSource, { ...actor, action: 'read', entityType: 'study', entityId: studyId, outcome: 'success', detail: { view: 'deliveries' } });
  return deliveries;
}
