import { Column, Entity, JoinColumn, ManyToOne, PrimaryGeneratedColumn, VersionColumn } from 'typeorm';
import { Timestamped } from './timestamps';
import { Patient } from './patient.entity';
import { User } from './user.entity';
import { numeric } from './numeric';

/**
 * One physiology study of one patient in one catheterization session.
 * `version` guards concurrent edits: a write names the version it read, a stale one is refused.
 * Numeric measurements come back from pg as strings; the repository reads them as float8.
 */
@Entity({ name: 'study' })
export class Study extends Timestamped {
  @PrimaryGeneratedColumn('uuid')
  id!: string;

  @Column('text')
  accession!: string;

  @Column('uuid', { name: 'patient_id' })
  patientId!: string;

  @ManyToOne(() => Patient, { onDelete: 'RESTRICT' })
  @JoinColumn({ name: 'patient_id' })
  patient?: Patient;

  /** draft | awaiting-signature | signed | amended */
  @Column('text', { default: 'draft' })
  state!: string;

  @Column('timestamptz', { name: 'procedure_started_at', nullable: true })
  procedureStartedAt!: Date | null;

  @Column('timestamptz', { name: 'procedure_ended_at', nullable: true })
  procedureEndedAt!: Date | null;

  @Column('uuid', { name: 'operator_id', nullable: true })
  operatorId!: string | null;

  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'operator_id' })
  operator?: User | null;

  @Column('text', { nullable: true })
  indication!: string | null;

  @Column('text', { name: 'clinical_question', nullable: true })
  clinicalQuestion!: string | null;

  @Column('text', { nullable: true }) encounter!: string | null;
  @Column('text', { name: 'referring_name', nullable: true }) referringName!: string | null;
  @Column('text', { name: 'referring_email', nullable: true }) referringEmail!: string | null;
  @Column('text', { name: 'access_site', nullable: true }) accessSite!: string | null;
  @Column('smallint', { name: 'guide_french', nullable: true }) guideFrench!: number | null;
  @Column('numeric', { name: 'weight_kg', nullable: true, transformer: numeric }) weightKg!: number | null;
  @Column('numeric', { name: 'height_cm', nullable: true, transformer: numeric }) heightCm!: number | null;
  @Column('boolean', { name: 'angina_present', nullable: true }) anginaPresent!: boolean | null;
  @Column('text', { name: 'angina_character', nullable: true }) anginaCharacter!: string | null;

  // Setup and quality steps.
  @Column('boolean', { name: 'transducer_zeroed', nullable: true }) transducerZeroed!: boolean | null;
  @Column('boolean', { name: 'nitrates_given', nullable: true }) nitratesGiven!: boolean | null;
  @Column('numeric', { name: 'nitrate_dose_ug', nullable: true, transformer: numeric }) nitrateDoseMicrograms!: number | null;
  @Column('boolean', { name: 'equalized_in_aorta', nullable: true }) equalizedInAorta!: boolean | null;
  @Column('boolean', { name: 'introducer_removed', nullable: true }) introducerRemoved!: boolean | null;
  @Column('text', { name: 'wire_position', nullable: true }) wirePosition!: string | null;
  @Column('text', { name: 'hyperemic_agent', nullable: true }) hyperemicAgent!: string | null;
  @Column('text', { name: 'hyperemic_route', nullable: true }) hyperemicRoute!: string | null;
  @Column('numeric', { name: 'hyperemic_dose', nullable: true, transformer: numeric }) hyperemicDose!: number | null;
  @Column('text', { name: 'hyperemic_dose_unit', nullable: true }) hyperemicDoseUnit!: string | null;
  @Column('numeric', { name: 'heparin_units', nullable: true, transformer: numeric }) heparinUnits!: number | null;
  @Column('text', { name: 'nitrate_timing', nullable: true }) nitrateTiming!: string | null;
  @Column('smallint', { name: 'baseline_heart_rate', nullable: true }) baselineHeartRate!: number | null;
  @Column('smallint', { name: 'baseline_systolic', nullable: true }) baselineSystolic!: number | null;
  @Column('smallint', { name: 'baseline_diastolic', nullable: true }) baselineDiastolic!: number | null;
  @Column('text', { name: 'baseline_rhythm', nullable: true }) baselineRhythm!: string | null;
  @Column('numeric', { nullable: true, transformer: numeric }) lvedp!: number | null;
  @Column('boolean', { name: 'nitrate_reversal', nullable: true }) nitrateReversal!: boolean | null;
  @Column('numeric', { name: 'reversal_ntg_ug', nullable: true, transformer: numeric }) reversalNitroglycerinMicrograms!: number | null;
  @Column('timestamptz', { name: 'reversal_ntg_at', nullable: true }) reversalNitroglycerinAt!: Date | null;

  // Findings and plan.
  @Column('text', { name: 'complication_kinds', array: true, default: () => "'{}'" }) complicationKinds!: string[];
  @Column('text', { nullable: true }) complications!: string | null;
  @Column('numeric', { name: 'contrast_ml', nullable: true, transformer: numeric }) contrastMl!: number | null;
  @Column('numeric', { name: 'fluoroscopy_minutes', nullable: true, transformer: numeric }) fluoroscopyMinutes!: number | null;
  @Column('numeric', { name: 'air_kerma_mgy', nullable: true, transformer: numeric }) airKermaMGy!: number | null;
  @Column('numeric', { name: 'dose_area_product_gycm2', nullable: true, transformer: numeric }) doseAreaProductGyCm2!: number | null;
  @Column('text', { nullable: true }) impression!: string | null;
  @Column('text', { nullable: true }) plan!: string | null;

  // Coding: the encounter, the diagnostic catheterization of the session (its interventions are rows).
  @Column('text', { name: 'coding_patient_class', nullable: true }) codingPatientClass!: string | null;
  @Column('text', { name: 'coding_billing', nullable: true }) codingBilling!: string | null;
  @Column('text', { name: 'coding_setting', nullable: true }) codingSetting!: string | null;
  @Column('text', { name: 'diagnostic_cath', nullable: true }) diagnosticCath!: string | null;
  @Column('boolean', { name: 'cath_coronary_angiography', default: false }) cathCoronaryAngiography!: boolean;
  @Column('boolean', { name: 'cath_left_heart', default: false }) cathLeftHeart!: boolean;
  @Column('boolean', { name: 'cath_left_ventriculography', default: false }) cathLeftVentriculography!: boolean;
  @Column('boolean', { name: 'cath_right_heart', default: false }) cathRightHeart!: boolean;
  @Column('boolean', { name: 'cath_graft_angiography', default: false }) cathGraftAngiography!: boolean;
  @Column('boolean', { name: 'coding_angina', nullable: true }) codingAngina!: boolean | null;

  @Column('uuid', { name: 'created_by', nullable: true }) createdBy!: string | null;

  /** Worklist order, computed by the database (procedure start, else when the record was opened). */
  @Column({ type: 'timestamptz', name: 'sort_at', nullable: true, insert: false, update: false, generatedType: 'STORED', asExpression: 'COALESCE(procedure_started_at, created_at)' })
  sortAt!: Date | null;

  @VersionColumn({ type: 'integer' })
  version!: number;
}
