import { Column, Entity, JoinColumn, ManyToOne, PrimaryColumn } from 'typeorm';
import type { StartBasis } from '../../../shared/turnaround/figures';
import { Study } from './study.entity';
import { User } from './user.entity';
import { numeric } from './numeric';

/**
 * A study's turnaround summary: when its clock started, when it was signed, coded and delivered, and
 * its quality counts. Kept by database triggers (migration Turnaround1765400000000); the server only reads it.
 */
@Entity({ name: 'study_turnaround' })
export class StudyTurnaround {
  @PrimaryColumn('uuid', { name: 'study_id' }) studyId!: string;
  @ManyToOne(() => Study, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'study_id' })
  study?: Study;
  @Column('timestamptz', { name: 'started_at' }) startedAt!: Date;
  @Column('text', { name: 'start_basis' }) startBasis!: StartBasis;
  @Column('uuid', { name: 'physician_id', nullable: true }) physicianId!: string | null;
  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'physician_id' })
  physician?: User | null;
  @Column('timestamptz', { name: 'signed_at', nullable: true }) signedAt!: Date | null;
  @Column('timestamptz', { name: 'coded_at', nullable: true }) codedAt!: Date | null;
  @Column('timestamptz', { name: 'delivered_at', nullable: true }) deliveredAt!: Date | null;
  @Column('text', { nullable: true }) endotype!: string | null;
  @Column('smallint', { default: 0 }) vessels!: number;
  @Column('smallint', { name: 'warned_vessels', default: 0 }) warnedVessels!: number;
  @Column('smallint', { name: 'pressure_vessels', default: 0 }) pressureVessels!: number;
  @Column('smallint', { name: 'drift_vessels', default: 0 }) driftVessels!: number;
  @Column('smallint', { name: 'drift_outside_vessels', default: 0 }) driftOutsideVessels!: number;
  /** The drift band of each checked vessel. */
  @Column('smallint', { name: 'drift_bins', array: true, default: () => "'{}'" }) driftBins!: number[];
  @Column('smallint', { name: 'thermo_vessels', default: 0 }) thermoVessels!: number;
  @Column('smallint', { name: 'thermo_complete_vessels', default: 0 }) thermoCompleteVessels!: number;
}

/** The one overdue-signature notice of a study: its key makes a second one impossible. */
@Entity({ name: 'overdue_notice' })
export class OverdueNotice {
  @PrimaryColumn('uuid', { name: 'study_id' }) studyId!: string;
  @ManyToOne(() => Study, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'study_id' })
  study?: Study;
  /** The study's turnaround summary (the same key). */
  @ManyToOne(() => StudyTurnaround)
  @JoinColumn({ name: 'study_id' })
  turnaround?: StudyTurnaround;
  @Column('uuid', { name: 'physician_id', nullable: true }) physicianId!: string | null;
  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'physician_id' })
  physician?: User | null;
  @Column('numeric', { name: 'target_hours', transformer: numeric }) targetHours!: number;
  @Column('timestamptz', { name: 'due_at' }) dueAt!: Date;
  @Column('timestamptz', { name: 'queued_at', default: () => 'now()' }) queuedAt!: Date;
  @Column('timestamptz', { name: 'sent_at', nullable: true }) sentAt!: Date | null;
  @Column('integer', { nullable: true }) recipients!: number | null;
}
