import { Column, Entity, JoinColumn, ManyToOne, PrimaryGeneratedColumn, VersionColumn } from 'typeorm';
import { Timestamped } from './timestamps';
import { Patient } from './patient.entity';
import { User } from './user.entity';

/**
 * One physiology study of one patient in one catheterization session.
 * `version` guards concurrent edits: a write names the version it read, a stale one is refused.
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

  @VersionColumn({ type: 'integer' })
  version!: number;
}
