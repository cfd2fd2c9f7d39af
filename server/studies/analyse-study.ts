import type { DataSource } from 'typeorm';
import { analyzeStudy, type PhysiologyResult } from '../../shared/physiology';
import { toPhysiologyInput } from '../../shared/study/to-physiology';
import { thresholdsInForce } from '../settings/queries/thresholds';
import type { AuditActor } from '../audit/audit';
import { readStudy } from './read-study';

/** The authoritative indices, flags, warnings and endotype of a study's stored measurements, under the thresholds in force. */
export async function analyseStudy(dataSource: DataSource, id: string, actor: AuditActor): Promise<{ version: number; analysis: PhysiologyResult }> {
  const study = await readStudy(dataSource, id, actor, 'analysis');
  const { overrides } = await thresholdsInForce(dataSource);
  return { version: study.version, analysis: analyzeStudy({ ...toPhysiologyInput(study), thresholds: overrides }) };
}
