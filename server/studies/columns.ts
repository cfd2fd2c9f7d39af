import type { DataSource, EntityManager, QueryDeepPartialEntity } from 'typeorm';
import type { Details, Findings, Setup, StudySections, Vasoreactivity } from '../../shared/study/schema';
import { Study } from '../db/entities/study.entity';

/** Section field → study column. Numbers are read back as float8 so they arrive as numbers. */
type Column<T> = { field: keyof T; column: string; kind?: 'number' | 'timestamp' };

export const detailsColumns: Column<Details>[] = [
  { field: 'encounter', column: 'encounter' },
  { field: 'procedureStartedAt', column: 'procedure_started_at', kind: 'timestamp' },
  { field: 'procedureEndedAt', column: 'procedure_ended_at', kind: 'timestamp' },
  { field: 'operatorId', column: 'operator_id' },
  { field: 'referringName', column: 'referring_name' },
  { field: 'referringEmail', column: 'referring_email' },
  { field: 'indication', column: 'indication' },
  { field: 'clinicalQuestion', column: 'clinical_question' },
  { field: 'accessSite', column: 'access_site' },
  { field: 'guideFrench', column: 'guide_french', kind: 'number' },
  { field: 'weightKg', column: 'weight_kg', kind: 'number' },
  { field: 'heightCm', column: 'height_cm', kind: 'number' },
  { field: 'anginaPresent', column: 'angina_present' },
  { field: 'anginaCharacter', column: 'angina_character' },
];

export const setupColumns: Column<Setup>[] = [
  { field: 'transducerZeroed', column: 'transducer_zeroed' },
  { field: 'nitratesGiven', column: 'nitrates_given' },
  { field: 'nitrateTiming', column: 'nitrate_timing' },
  { field: 'nitrateDoseMicrograms', column: 'nitrate_dose_ug', kind: 'number' },
  { field: 'equalizedInAorta', column: 'equalized_in_aorta' },
  { field: 'introducerRemoved', column: 'introducer_removed' },
  { field: 'wirePosition', column: 'wire_position' },
  { field: 'hyperemicAgent', column: 'hyperemic_agent' },
  { field: 'hyperemicRoute', column: 'hyperemic_route' },
  { field: 'hyperemicDose', column: 'hyperemic_dose', kind: 'number' },
  { field: 'hyperemicDoseUnit', column: 'hyperemic_dose_unit' },
  { field: 'heparinUnits', column: 'heparin_units', kind: 'number' },
  { field: 'baselineHeartRate', column: 'baseline_heart_rate' },
  { field: 'baselineSystolic', column: 'baseline_systolic' },
  { field: 'baselineDiastolic', column: 'baseline_diastolic' },
  { field: 'baselineRhythm', column: 'baseline_rhythm' },
  { field: 'lvedp', column: 'lvedp', kind: 'number' },
];

/** The vasoreactivity section's own fields (its doses live in their own table). */
export const vasoreactivityColumns: Column<Omit<Vasoreactivity, 'doses'>>[] = [
  { field: 'nitrateReversal', column: 'nitrate_reversal' },
  { field: 'reversalNitroglycerinMicrograms', column: 'reversal_ntg_ug', kind: 'number' },
  { field: 'reversalNitroglycerinAt', column: 'reversal_ntg_at', kind: 'timestamp' },
];

export const findingsColumns: Column<Findings>[] = [
  { field: 'complicationKinds', column: 'complication_kinds' },
  { field: 'complications', column: 'complications' },
  { field: 'contrastMl', column: 'contrast_ml', kind: 'number' },
  { field: 'fluoroscopyMinutes', column: 'fluoroscopy_minutes', kind: 'number' },
  { field: 'airKermaMGy', column: 'air_kerma_mgy', kind: 'number' },
  { field: 'doseAreaProductGyCm2', column: 'dose_area_product_gycm2', kind: 'number' },
  { field: 'impression', column: 'impression' },
  { field: 'plan', column: 'plan' },
];

/** The coding section's own fields (its interventions live in their own table). */
export const codingColumns: Column<Omit<StudySections['coding'], 'interventions'>>[] = [
  { field: 'patientClass', column: 'coding_patient_class' },
  { field: 'billing', column: 'coding_billing' },
  { field: 'setting', column: 'coding_setting' },
  { field: 'diagnosticCath', column: 'diagnostic_cath' },
  { field: 'coronaryAngiography', column: 'cath_coronary_angiography' },
  { field: 'leftHeart', column: 'cath_left_heart' },
  { field: 'leftVentriculography', column: 'cath_left_ventriculography' },
  { field: 'rightHeart', column: 'cath_right_heart' },
  { field: 'graftAngiography', column: 'cath_graft_angiography' },
  { field: 'angina', column: 'coding_angina' },
];

export function selectList<T>(columns: Column<T>[], alias: string, prefix: string): string {
  return columns
    .map((c) => `${alias}.${c.column}${c.kind === 'number' ? '::float8' : ''} AS "${prefix}.${String(c.field)}"`)
    .join(', ');
}

export function readSection<T>(columns: Column<T>[], row: Record<string, unknown>, prefix: string): T {
  const out: Record<string, unknown> = {};
  for (const c of columns) {
    const v = row[`${prefix}.${String(c.field)}`];
    out[c.field as string] = v instanceof Date ? v.toISOString() : (v ?? null);
  }
  return out as T;
}

/**
 * A section's values for an insert or update of the study entity, by the entity's property names
 * (found through each column's name); a field the section leaves out is written as null.
 */
export function studyValues<T>(db: DataSource | EntityManager, columns: Column<T>[], section: T): QueryDeepPartialEntity<Study> {
  const metadata = db.getRepository(Study).metadata;
  const values: Record<string, unknown> = {};
  for (const c of columns) {
    const property = metadata.findColumnWithDatabaseName(c.column)?.propertyName;
    if (!property) throw new Error(`The study entity has no column ${c.column}`);
    values[property] = (section as Record<string, unknown>)[c.field as string] ?? null;
  }
  return values as QueryDeepPartialEntity<Study>;
}
