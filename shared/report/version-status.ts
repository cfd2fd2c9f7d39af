/** The status of a signed report version: the first signature is final, each later one an amendment. */
export const reportVersionStatuses = ['final', 'amended'] as const;
export type ReportVersionStatus = (typeof reportVersionStatuses)[number];
