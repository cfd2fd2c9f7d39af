import express, { type Request } from 'express';
import type { DataSource } from 'typeorm';
import { z } from 'zod';
import { thresholdsChoices } from '../../shared/report/thresholds-basis';
import { stateChanges } from '../../shared/study/state-machine';
import { auditContext } from '../audit/audit';
import type { Config } from '../config';
import type { ApiRoute } from '../http/routes';
import { parseOrThrow, uuidParam } from '../http/validate';
import { changeStudyState } from '../reports/change-study-state';
import { exportReportPdf } from '../reports/export-report-pdf';
import { ReauthenticationRequiredError } from '../reports/errors';
import { identifyReport } from '../reports/identify-report';
import { readReportPreview } from '../reports/read-report-preview';
import { signStudy } from '../reports/sign-study';
import { SIGNING_SLOTS, slots } from '../reports/signing-slots';

const idParam = (req: Request, what = 'study') => uuidParam(req, what);

const reasonSchema = z.string({ error: 'reason must be text.' }).trim().max(1000, { error: 'The reason is too long (at most 1000 characters).' }).nullable().optional();
const versionSchema = z.number({ error: 'version is required: the study version you previewed.' }).int().min(1);
const thresholdsChoiceSchema = z.enum(thresholdsChoices, { error: 'thresholds must be "original" (keep the amended version\'s) or "current" (those in force now).' });
const signSchema = z.strictObject({ version: versionSchema, reason: reasonSchema, thresholds: thresholdsChoiceSchema.optional() });
const previewQuerySchema = z.object({ thresholds: thresholdsChoiceSchema.optional() });
const transitionSchema = z.strictObject({
  action: z.enum(stateChanges, { error: `action must be ${stateChanges.slice(0, -1).join(', ')} or ${stateChanges.at(-1)}.` }),
  version: versionSchema,
  reason: reasonSchema,
});
const verifySchema = z.strictObject({ fingerprint: z.string({ error: 'fingerprint must be text.' }).max(200) });

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
          const body = parseOrThrow(transitionSchema, req.body);
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
          const body = parseOrThrow(signSchema, req.body);
          const auth = req.session.auth!;
          // An electronic signature confirms who signs: a sign-in older than the limit must be renewed.
          if (auth.authenticatedAt === undefined || Date.now() - auth.authenticatedAt > config.signReauthMinutes * 60_000) {
            throw new ReauthenticationRequiredError(config.signReauthMinutes, `/studies/${id}/report`);
          }
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
          const evidence = Buffer.isBuffer(req.body) ? { pdf: req.body } : parseOrThrow(verifySchema, req.body);
          res.json(await identifyReport(dataSource, evidence, auditContext(req)));
        },
      ],
    },
  ];
}
