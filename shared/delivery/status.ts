import type { ReportVersionStatus } from '../report/version-status';

/**
 * Delivery of signed reports to the EHR, as the server stores it and the screens show it.
 * Pure types and labels: used by the server, the API client and the screens.
 */
export const deliveryStatuses = ['queued', 'sending', 'delivered', 'failed-retrying', 'rejected', 'given-up'] as const;
export type DeliveryStatus = (typeof deliveryStatuses)[number];

/** Statuses that need someone to act (or at least to look). */
export const attentionStatuses = ['failed-retrying', 'rejected', 'given-up'] as const satisfies readonly DeliveryStatus[];

export const deliveryStatusLabel: Record<DeliveryStatus, string> = {
  queued: 'Queued',
  sending: 'Sending',
  delivered: 'Delivered',
  'failed-retrying': 'Retrying',
  rejected: 'Rejected by the EHR',
  'given-up': 'Given up',
};

/** One issue of the EHR's OperationOutcome (FHIR R4 OperationOutcome.issue). */
export interface DeliveryIssue {
  severity: string;
  code: string;
  /** FHIRPath locations of the issue in the bundle. */
  expression?: string[];
  diagnostics?: string;
}

/** A resource the EHR created or updated, from the transaction-response's `response.location`. */
export interface EhrResourceId {
  resourceType: string;
  id: string;
  version?: string;
}

/** One report version's delivery, as the study page shows it. */
export interface StudyDelivery {
  reportVersionId: string;
  versionNo: number;
  reportStatus: ReportVersionStatus;
  status: DeliveryStatus;
  attempts: number;
  lastError: string | null;
  httpStatus: number | null;
  issues: DeliveryIssue[];
  ehrReportId: string | null;
  ehrIds: EhrResourceId[];
  queuedAt: string;
  lastAttemptAt: string | null;
  nextAttemptAt: string | null;
  deliveredAt: string | null;
  stoppedAt: string | null;
}

/**
 * One delivery in the administrators' list: accession number, status and the issues' codes and
 * locations only — no patient data (administrators do not read patient records).
 */
export interface DeliveryListItem {
  reportVersionId: string;
  accession: string;
  versionNo: number;
  status: DeliveryStatus;
  attempts: number;
  lastError: string | null;
  httpStatus: number | null;
  issues: Array<Pick<DeliveryIssue, 'severity' | 'code' | 'expression'>>;
  lastAttemptAt: string | null;
  nextAttemptAt: string | null;
  stoppedAt: string | null;
}
