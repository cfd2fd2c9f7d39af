// The report document lives in server/report-document/. This re-export serves server/reports/sign-study.ts
// until it imports from there; then this folder goes.
export { ATTESTATION, prepareSignedReport } from '../report-document';
