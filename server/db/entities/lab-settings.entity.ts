import { Column, Entity, JoinColumn, ManyToOne, PrimaryColumn } from 'typeorm';
import { User } from './user.entity';
import { numeric } from './numeric';

/** The lab's settings: one row (id 1); a null EHR endpoint or mail sender means the server's configuration applies. */
@Entity({ name: 'lab_settings' })
export class LabSettingsRecord {
  @PrimaryColumn('smallint', { default: 1 }) id!: number;
  @Column('text', { name: 'time_zone', default: 'UTC' }) timeZone!: string;
  @Column('numeric', { name: 'signature_target_hours', precision: 5, scale: 1, default: 24, transformer: numeric }) signatureTargetHours!: number;
  @Column('text', { name: 'ehr_base_url', nullable: true }) ehrBaseUrl!: string | null;
  @Column('text', { name: 'mail_from', nullable: true }) mailFrom!: string | null;
  @Column('text', { name: 'template_version', default: 'v1' }) templateVersion!: string;
  /** Guards concurrent edits; written by the settings services themselves (not a TypeORM version column). */
  @Column('integer', { default: 1 }) version!: number;
  @Column('timestamptz', { name: 'updated_at', nullable: true }) updatedAt!: Date | null;
  @Column('uuid', { name: 'updated_by', nullable: true }) updatedBy!: string | null;
  @ManyToOne(() => User, { onDelete: 'SET NULL', nullable: true })
  @JoinColumn({ name: 'updated_by' })
  updater?: User | null;
}
