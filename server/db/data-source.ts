import 'reflect-metadata';
import { DataSource } from 'typeorm';
import { defaultLogger, SafeQueryLogger, type Logger } from '../log';
import { User } from './entities/user.entity';
import { Patient } from './entities/patient.entity';
import { Study } from './entities/study.entity';
import { AcetylcholineDose, Attachment, ThermodilutionInjection, ThresholdSet, VesselAssessment } from './entities/measurement.entities';
import { InitialSchema1764633600000 } from './migrations/1764633600000-initial-schema';
import { SessionsAndAudit1764720000000 } from './migrations/1764720000000-sessions-and-audit';
import { StudyRecord1764806400000 } from './migrations/1764806400000-study-record';
import { PatientNameSearch1764892800000 } from './migrations/1764892800000-patient-name-search';
import { EndedSessions1764979200000 } from './migrations/1764979200000-ended-sessions';
import { StudyRecordDetails1765065600000 } from './migrations/1765065600000-study-record-details';
import { ReportVersions1765152000000 } from './migrations/1765152000000-report-versions';
import { ReportPdf, ReportVersion } from './entities/report-version.entity';
import { ReportDelivery } from './entities/report-delivery.entity';
import { ReportDelivery1765324800000 } from './migrations/1765324800000-report-delivery';

import { SignedStudyGuard1765131313000 } from './migrations/1765131313000-signed-study-guard';
import { PatientMrnSearch1765100000000 } from './migrations/1765100000000-patient-mrn-search';
import { CodeDecision, CodeLine, CodeSuggestionSet, CodingReview, CoronaryIntervention } from './entities/coding.entities';
import { CodeReview1765238400000 } from './migrations/1765238400000-code-review';
import { Turnaround1765400000000 } from './migrations/1765400000000-turnaround';
import { AuditSearch1765410000000 } from './migrations/1765410000000-audit-search';
import { LabSettings1765420000000 } from './migrations/1765420000000-lab-settings';
import { ReportPdf1765430000000 } from './migrations/1765430000000-report-pdf';
import { LabSettingsRecord } from './entities/lab-settings.entity';
import { OverdueNotice, StudyTurnaround } from './entities/turnaround.entities';

/** Entities and migrations are listed, not globbed, so tsx, vitest and a bundler all see the same set. */
const entities = [User, Patient, Study, VesselAssessment, ThermodilutionInjection, AcetylcholineDose, Attachment, ThresholdSet, ReportVersion, ReportPdf, ReportDelivery, CoronaryIntervention, CodeSuggestionSet, CodeLine, CodeDecision, CodingReview, LabSettingsRecord, StudyTurnaround, OverdueNotice];
const migrations = [
  InitialSchema1764633600000,
  SessionsAndAudit1764720000000,
  StudyRecord1764806400000,
  PatientNameSearch1764892800000,
  EndedSessions1764979200000,
  StudyRecordDetails1765065600000,
  PatientMrnSearch1765100000000,
  SignedStudyGuard1765131313000,
  ReportVersions1765152000000,
  CodeReview1765238400000,
  ReportDelivery1765324800000,
  Turnaround1765400000000,
  AuditSearch1765410000000,
  LabSettings1765420000000,
  ReportPdf1765430000000,
];

/** Failing queries are logged by their SQL text and SQLSTATE only (see server/log.ts). */
export function createDataSource(databaseUrl: string, poolSize = 10, logger: Logger = defaultLogger()): DataSource {
  return new DataSource({
    type: 'postgres',
    url: databaseUrl,
    entities,
    migrations,
    migrationsTableName: 'schema_migration',
    synchronize: false,
    migrationsRun: false,
    logging: ['error', 'warn'],
    logger: new SafeQueryLogger(logger),
    extra: { max: poolSize, connectionTimeoutMillis: 3000 },
  });
}

/** True when the database answers a trivial query within the time limit. */
export async function databaseAnswers(dataSource: DataSource, timeoutMs = 2000): Promise<boolean> {
  if (!dataSource.isInitialized) return false;
  let timer: ReturnType<typeof setTimeout> | undefined;
  try {
    const timeout = new Promise<never>((_, reject) => {
      timer = setTimeout(() => reject(new Error('database timeout')), timeoutMs);
    });
    await Promise.race([dataSource.query('SELECT 1'), timeout]);
    return true;
  } catch {
    return false;
  } finally {
    clearTimeout(timer);
  }
}
