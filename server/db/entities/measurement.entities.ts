import { Column, Entity, JoinColumn, ManyToOne, PrimaryColumn, PrimaryGeneratedColumn } from 'typeorm';
import { Study } from './study.entity';
import { User } from './user.entity';

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
  @Column('smallint', { nullable: true }) segment!: number | null;
  @Column('numeric', { name: 'visual_stenosis_pct', nullable: true }) visualStenosisPct!: string | null;
  @Column('numeric', { name: 'rest_pa', nullable: true }) restPa!: string | null;
  @Column('numeric', { name: 'rest_pd', nullable: true }) restPd!: string | null;
  @Column('numeric', { name: 'hyperemia_pa', nullable: true }) hyperemiaPa!: string | null;
  @Column('numeric', { name: 'hyperemia_pd', nullable: true }) hyperemiaPd!: string | null;
  @Column('numeric', { name: 'console_ffr', nullable: true }) consoleFfr!: string | null;
  @Column('text', { name: 'nhpr_kind', nullable: true }) nhprKind!: string | null;
  @Column('numeric', { name: 'nhpr_value', nullable: true }) nhprValue!: string | null;
  @Column('numeric', { name: 'wedge_pressure', nullable: true }) wedgePressure!: string | null;
  @Column('numeric', { name: 'drift_pd_pa', nullable: true }) driftPdPa!: string | null;
  @Column('text', { name: 'pullback_pattern', nullable: true }) pullbackPattern!: string | null;
  @Column('text', { nullable: true }) decision!: string | null;
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
  @Column('numeric', { name: 'transit_s' }) transitSeconds!: string;
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
  @Column('numeric', { nullable: true }) micrograms!: string | null;
  @Column('numeric', { name: 'constriction_pct', nullable: true }) constrictionPct!: string | null;
  @Column('boolean', { nullable: true }) symptoms!: boolean | null;
  @Column('boolean', { name: 'ischemic_ecg', nullable: true }) ischemicEcg!: boolean | null;
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
  @Column('timestamptz', { name: 'uploaded_at' }) uploadedAt!: Date;
}
