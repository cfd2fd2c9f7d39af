import { Column, Entity, JoinColumn, ManyToOne, PrimaryColumn, PrimaryGeneratedColumn } from 'typeorm';
import { Study } from './study.entity';
import { User } from './user.entity';
import { numeric } from './numeric';

/** One vessel measured in a study (pressures, resting ratio, drift check, decision). */
@Entity({ name: 'vessel_assessment' })
export class VesselAssessment {
  /** Chosen by the client, so a row keeps its identity across autosaves. */
  @PrimaryColumn('uuid') id!: string;
  @Column('uuid', { name: 'study_id' }) studyId!: string;
  @ManyToOne(() => Study, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'study_id' })
  study?: Study;
  @Column('smallint') position!: number;
  @Column('text') vessel!: string;
  @Column('text', { nullable: true }) segment!: string | null;
  @Column('numeric', { name: 'visual_stenosis_pct', nullable: true, transformer: numeric }) visualStenosisPct!: number | null;
  @Column('numeric', { name: 'rest_pa', nullable: true, transformer: numeric }) restPa!: number | null;
  @Column('numeric', { name: 'rest_pd', nullable: true, transformer: numeric }) restPd!: number | null;
  @Column('numeric', { name: 'hyperemia_pa', nullable: true, transformer: numeric }) hyperemiaPa!: number | null;
  @Column('numeric', { name: 'hyperemia_pd', nullable: true, transformer: numeric }) hyperemiaPd!: number | null;
  @Column('numeric', { name: 'console_ffr', nullable: true, transformer: numeric }) consoleFfr!: number | null;
  @Column('text', { name: 'nhpr_kind', nullable: true }) nhprKind!: string | null;
  @Column('numeric', { name: 'nhpr_value', nullable: true, transformer: numeric }) nhprValue!: number | null;
  @Column('numeric', { name: 'wedge_pressure', nullable: true, transformer: numeric }) wedgePressure!: number | null;
  @Column('numeric', { name: 'drift_pd_pa', nullable: true, transformer: numeric }) driftPdPa!: number | null;
  @Column('text', { name: 'pullback_pattern', nullable: true }) pullbackPattern!: string | null;
  @Column('text', { nullable: true }) decision!: string | null;
  @Column('text', { name: 'drift_not_done_reason', nullable: true }) driftNotDoneReason!: string | null;
  @Column('smallint', { name: 'timi_flow', nullable: true }) timiFlow!: number | null;
  @Column('numeric', { name: 'corrected_frame_count', nullable: true, transformer: numeric }) correctedFrameCount!: number | null;
}

/** One saline injection's mean transit time, at rest or at hyperaemia. */
@Entity({ name: 'thermodilution_injection' })
export class ThermodilutionInjection {
  @PrimaryColumn('uuid', { name: 'vessel_assessment_id' }) vesselAssessmentId!: string;
  @ManyToOne(() => VesselAssessment, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'vessel_assessment_id' })
  vesselAssessment?: VesselAssessment;
  @PrimaryColumn('text') phase!: 'rest' | 'hyperemia';
  @PrimaryColumn('smallint') position!: number;
  @Column('numeric', { name: 'transit_s', transformer: numeric }) transitSeconds!: number;
}

/** One acetylcholine dose of a vasoreactivity test, with the response. */
@Entity({ name: 'acetylcholine_dose' })
export class AcetylcholineDose {
  @PrimaryColumn('uuid') id!: string;
  @Column('uuid', { name: 'study_id' }) studyId!: string;
  @ManyToOne(() => Study, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'study_id' })
  study?: Study;
  @Column('smallint') position!: number;
  @Column('text') vessel!: string;
  @Column('numeric', { nullable: true, transformer: numeric }) micrograms!: number | null;
  @Column('numeric', { name: 'constriction_pct', nullable: true, transformer: numeric }) constrictionPct!: number | null;
  @Column('boolean', { nullable: true }) symptoms!: boolean | null;
  @Column('boolean', { name: 'ischemic_ecg', nullable: true }) ischemicEcg!: boolean | null;
  @Column('smallint', { name: 'heart_rate', nullable: true }) heartRate!: number | null;
  @Column('smallint', { nullable: true }) systolic!: number | null;
  @Column('smallint', { nullable: true }) diastolic!: number | null;
  @Column('text', { nullable: true }) rhythm!: string | null;
  /** Where constriction was seen; `vessel` is where the drug was injected. */
  @Column('text', { name: 'spasm_vessel', nullable: true }) spasmVessel!: string | null;
  @Column('text', { name: 'spasm_segment', nullable: true }) spasmSegment!: string | null;
  @Column('text', { name: 'spasm_pattern', nullable: true }) spasmPattern!: string | null;
}

/** A set of the lab's thresholds, in force from `effectiveFrom` until the next set. */
@Entity({ name: 'threshold_set' })
export class ThresholdSet {
  @PrimaryGeneratedColumn('increment') id!: number;
  @Column('timestamptz', { name: 'effective_from' }) effectiveFrom!: Date;
  /** Only the values that differ from the published defaults. */
  @Column('jsonb') values!: Record<string, unknown>;
  @Column('text', { nullable: true }) note!: string | null;
  @Column('uuid', { name: 'created_by', nullable: true }) createdBy!: string | null;
  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'created_by' })
  creator?: User | null;
  /** The database's clock, never written by the server (its role may not: server/db/privileges.ts). */
  @Column({ type: 'timestamptz', name: 'created_at', default: () => 'now()', insert: false, update: false }) createdAt!: Date;
}

/** A file attached to a study; the bytes live in attachment storage under `storageKey`. */
@Entity({ name: 'attachment' })
export class Attachment {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column('uuid', { name: 'study_id' }) studyId!: string;
  @ManyToOne(() => Study, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'study_id' })
  study?: Study;
  @Column('text', { name: 'file_name' }) fileName!: string;
  @Column('text', { name: 'media_type' }) mediaType!: string;
  @Column('bigint', { name: 'size_bytes' }) sizeBytes!: string;
  @Column('char', { length: 64 }) sha256!: string;
  @Column('text', { name: 'storage_key' }) storageKey!: string;
  @Column('uuid', { name: 'uploaded_by', nullable: true }) uploadedBy!: string | null;
  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'uploaded_by' })
  uploader?: User | null;
  @Column('timestamptz', { name: 'uploaded_at', default: () => 'now()' }) uploadedAt!: Date;
}
