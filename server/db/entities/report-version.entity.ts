import { Column, Entity, JoinColumn, ManyToOne, OneToOne, PrimaryColumn, PrimaryGeneratedColumn, type Relation } from 'typeorm';
import type { ThresholdsBasis } from '../../../shared/report/thresholds-basis';
import { Study } from './study.entity';
import { User } from './user.entity';
import type { ReportVersionStatus } from '../../../shared/report/version-status';

/**
 * One signed report version: what was signed, exactly as it was signed. Never updated or deleted (a
 * database trigger refuses it); an addendum adds a new version that supersedes this one.
 */
@Entity({ name: 'report_version' })
export class ReportVersion {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column('uuid', { name: 'study_id' }) studyId!: string;
  @ManyToOne(() => Study, { onDelete: 'RESTRICT' })
  @JoinColumn({ name: 'study_id' })
  study?: Study;
  /** 1 for the first signature, then one more per addendum. */
  @Column('integer', { name: 'version_no' }) versionNo!: number;
  /** The study record's version the report was built from (what the signer previewed). */
  @Column('integer', { name: 'study_version' }) studyVersion!: number;
  @Column('text') status!: ReportVersionStatus;
  @Column('uuid', { name: 'supersedes_id', nullable: true }) supersedesId!: string | null;
  @Column('text', { nullable: true }) reason!: string | null;
  @Column('text', { name: 'narrative_html' }) narrativeHtml!: string;
  @Column('text', { name: 'narrative_text' }) narrativeText!: string;
  @Column('jsonb') snapshot!: unknown;
  @Column('jsonb') analysis!: unknown;
  @Column('jsonb') thresholds!: unknown;
  @Column('text', { name: 'template_version' }) templateVersion!: string;
  /** Which thresholds judged it: those in force at signing, or for an addendum the original's or the current ones. Null before this was recorded. */
  @Column('text', { name: 'thresholds_basis', nullable: true }) thresholdsBasis!: ThresholdsBasis | null;
  /** The threshold set those values came from; null for the published defaults. */
  @Column('integer', { name: 'threshold_set_id', nullable: true }) thresholdSetId!: number | null;
  @Column('char', { name: 'content_sha256', length: 64 }) contentSha256!: string;
  @Column('uuid', { name: 'signed_by' }) signedBy!: string;
  @ManyToOne(() => User, { onDelete: 'RESTRICT' })
  @JoinColumn({ name: 'signed_by' })
  signer?: User;
  @Column('text', { name: 'signer_name' }) signerName!: string;
  @Column('timestamptz', { name: 'signed_at' }) signedAt!: Date;
  @Column('text') attestation!: string;
  /** Its PDF (`report_pdf`), loaded only when asked for. */
  @OneToOne(() => ReportPdf, (p) => p.version)
  pdfFile?: Relation<ReportPdf>;
}

/** A signed version's PDF, byte for byte as signed; written with its version, never updated or deleted. */
@Entity({ name: 'report_pdf' })
export class ReportPdf {
  @PrimaryColumn('uuid', { name: 'report_version_id' }) reportVersionId!: string;
  @OneToOne(() => ReportVersion, (v) => v.pdfFile, { onDelete: 'RESTRICT' })
  @JoinColumn({ name: 'report_version_id' })
  version?: ReportVersion;
  @Column('bytea') pdf!: Buffer;
  @Column('char', { name: 'pdf_sha256', length: 64 }) pdfSha256!: string;
}
