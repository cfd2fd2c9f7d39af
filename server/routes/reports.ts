import express, { type Request } from 'express';
import type { DataSource } from 'typeorm';
import { previewQuerySchema, signBodySchema, transitionBodySchema, verifyBodySchema } from '../../shared/report/requests';
import { auditContext } from '../audit/audit';
import type { Config } from '../config';
import type { ApiRoute } from '../http/routes';
import { parseOrThrow, uuidParam } from '../http/validate';
import { changeStudyState } from '../reports/change-study-state';
import { exportReportPdf } from '../reports/export-report-pdf';
import { identifyReport } from '../reports/identify-report';
import { readReportPreview } from '../reports/read-report-preview';
import { requireRecentSignIn } from '../reports/require-recent-sign-in';
import { signStudy } from '../reports/sign-study';
import { SIGNING_SLOTS, slots } from '../reports/signing-slots';

const idParam = (req: Request, what = 'study') => uuidParam(req, what);

/** Report preview, hand-off, signing, addenda, signed PDFs and verification. */
export function reportRoutes({ config, dataSource }: { config: Config; dataSource: DataSource }): ApiRoute[] {
  const signing = slots(SIGNING_SLOTS);
  return [
    {
      method: 'get',
      path: '/studies/:id/report',
      access: 'study:read',
      summary: 'The report as it would be signed now, what is missing, the signed versions and the actions open to you',
      handlers: [
        async (req, res) => {
          const id = idParam(req);
          const query = parseOrThrow(previewQuerySchema, req.query, 'The address');
          res.json(await readReportPreview(dataSource, id, { role: req.session.auth!.role, hospital: config.hospital, thresholds: query.thresholds ?? 'original', actor: auditContext(req), auditWindowSeconds: config.auditPreviewReadSeconds }));
        },
      ],
    },
    {
      method: 'post',
      path: '/studies/:id/transitions',
      access: 'study:read',
      summary: 'Ready for review, send back with a reason, open or discard an addendum',
      handlers: [
        async (req, res) => {
          const id = idParam(req);
          const body = parseOrThrow(transitionBodySchema, req.body);
          const auth = req.session.auth!;
          const record = await changeStudyState(dataSource, { studyId: id, action: body.action, studyVersion: body.version, reason: body.reason, role: auth.role, audit: auditContext(req) });
          res.json(record);
        },
      ],
    },
    {
      method: 'post',
      path: '/studies/:id/sign',
      access: 'study:sign',
      summary: 'Sign the previewed version (or the open addendum with its reason): one immutable report version',
      handlers: [
        async (req, res) => {
          const id = idParam(req);
          const body = parseOrThrow(signBodySchema, req.body);
          const auth = req.session.auth!;
          requireRecentSignIn(auth, config.signReauthMinutes, `/studies/${id}/report`);
          const version = await signing.run(() =>
            signStudy(dataSource, {
              studyId: id,
              studyVersion: body.version,
              reason: body.reason,
              thresholds: body.thresholds,
              signer: { userId: auth.userId, displayName: auth.displayName, role: auth.role },
              hospital: config.hospital,
              audit: auditContext(req),
            }),
          );
          res.status(201).json(version);
        },
      ],
    },
    {
      method: 'get',
      path: '/reports/:id/pdf',
      access: 'study:read',
      summary: 'A signed version’s PDF, byte for byte as signed',
      handlers: [
        async (req, res) => {
          const id = idParam(req, 'report version');
          const { fileName, pdf, sha256 } = await exportReportPdf(dataSource, id, auditContext(req));
          res.setHeader('Content-Type', 'application/pdf');
          res.setHeader('Content-Disposition', `inline; filename="${fileName}"`);
          res.setHeader('X-Content-SHA256', sha256);
          res.send(pdf);
        },
      ],
    },
    {
      method: 'post',
      path: '/reports/verify',
      access: 'study:read',
      summary: 'Which study and version a PDF (its bytes) or a printed fingerprint is, and whether it is superseded',
      handlers: [
        express.raw({ type: 'application/pdf', limit: config.attachments.maxBytes }),
        async (req, res) => {
          const evidence = Buffer.isBuffer(req.body) ? { pdf: req.body } : parseOrThrow(verifyBodySchema, req.body);
          res.json(await identifyReport(dataSource, evidence, auditContext(req)));
        },
      ],
    },
  ];
}
