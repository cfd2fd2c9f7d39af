import { Column, Entity, JoinColumn, ManyToOne, PrimaryGeneratedColumn } from 'typeorm';
import type { DeliveryIssue, DeliveryStatus, EhrResourceId } from '../../../shared/delivery/status';
import { ReportVersion } from './report-version.entity';
import { Timestamped } from './timestamps';

/** The delivery of one signed report version to the EHR (see the migration for the rules). */
@Entity({ name: 'report_delivery' })
export class ReportDelivery extends Timestamped {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column('uuid', { name: 'report_version_id' }) reportVersionId!: string;
  @ManyToOne(() => ReportVersion, { onDelete: 'RESTRICT' })
  @JoinColumn({ name: 'report_version_id' })
  reportVersion?: ReportVersion;
  @Column('uuid', { name: 'study_id' }) studyId!: string;
  @Column('text') status!: DeliveryStatus;
  @Column('integer') attempts!: number;
  /** Written by Isobar from the failure's kind and HTTP status: never patient data. */
  @Column('text', { name: 'last_error', nullable: true }) lastError!: string | null;
  @Column('integer', { name: 'http_status', nullable: true }) httpStatus!: number | null;
  /** The EHR's OperationOutcome issues from the last refusal or failure. */
  @Column('jsonb', { nullable: true }) issues!: DeliveryIssue[] | null;
  /** Bundle.identifier as system|value. */
  @Column('text', { name: 'bundle_identifier', nullable: true }) bundleIdentifier!: string | null;
  /** The EHR's id of the DiagnosticReport (Type/id). */
  @Column('text', { name: 'ehr_report_id', nullable: true }) ehrReportId!: string | null;
  /** Every resource the EHR answered with, in bundle order. */
  @Column('jsonb', { name: 'ehr_ids' }) ehrIds!: EhrResourceId[];
  @Column('timestamptz', { name: 'queued_at' }) queuedAt!: Date;
  @Column('timestamptz', { name: 'first_attempt_at', nullable: true }) firstAttemptAt!: Date | null;
  @Column('timestamptz', { name: 'last_attempt_at', nullable: true }) lastAttemptAt!: Date | null;
  @Column('timestamptz', { name: 'next_attempt_at', nullable: true }) nextAttemptAt!: Date | null;
  @Column('timestamptz', { name: 'lease_until', nullable: true }) leaseUntil!: Date | null;
  @Column('timestamptz', { name: 'delivered_at', nullable: true }) deliveredAt!: Date | null;
  /** When the delivery stopped without success (rejected or given up). */
  @Column('timestamptz', { name: 'stopped_at', nullable: true }) stoppedAt!: Date | null;
  @Column('uuid', { name: 'resend_requested_by', nullable: true }) resendRequestedBy!: string | null;
  @Column('timestamptz', { name: 'resend_requested_at', nullable: true }) resendRequestedAt!: Date | null;
}
