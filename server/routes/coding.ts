import type { Request } from 'express';
import type { DataSource } from 'typeorm';
import { addCodeSchema, codeExportQuerySchema, codingQueueQuerySchema, completeReviewSchema, decideCodeSchema } from '../../shared/coding/review';
import { auditContext } from '../audit/audit';
import type { ApiRoute } from '../http/routes';
import { parseOrThrow, uuidParam } from '../http/validate';
import type { CodingActor } from '../coding/actor';
import { addCode } from '../coding/add-code';
import { completeReview } from '../coding/complete-review';
import { decideCode } from '../coding/decide-code';
import { exportReviewedCodes } from '../coding/export-reviewed-codes';
import { readReview } from '../coding/read-review';
import { searchCodingQueue } from '../coding/search-queue';

const studyIdOf = (req: Request) => uuidParam(req, 'study');
/** Who decides: the signed-in user (every coding route's guard admits only them), named in the audit trail. */
const actorOf = (req: Request): CodingActor => {
  const auth = req.session.auth;
  // Reaching here without a user means a route lost its guard: refuse rather than record an unnamed actor.
  if (!auth) throw new Error('A coding change reached its route without a signed-in user.');
  return { ...auditContext(req), actorUserId: auth.userId, actorName: auth.displayName };
};

/** The coding queue and a study's code review. Coders review; the chief reads. Every read and change is audited. */
export function codingRoutes({ dataSource }: { dataSource: DataSource }): ApiRoute[] {
  return [
    {
      method: 'get',
      path: '/coding/queue',
      access: 'coding:read',
      summary: 'Studies whose codes await review, oldest first; filters by physician, signing day and status',
      handlers: [
        async (req, res) => {
          const query = parseOrThrow(codingQueueQuerySchema, req.query, 'The queue query');
          res.json({ items: await searchCodingQueue(dataSource, query, auditContext(req)) });
        },
      ],
    },
    {
      method: 'get',
      path: '/coding/studies/:id',
      access: 'coding:read',
      summary: "A study's code review: suggestions with their rule and reason, decisions, the signed report, changes since the previous version",
      handlers: [
        async (req, res) => {
          res.json(await readReview(dataSource, studyIdOf(req), auditContext(req)));
        },
      ],
    },
    {
      method: 'post',
      path: '/coding/studies/:id/decisions',
      access: 'coding:review',
      summary: 'Accept, edit (with a reason) or reject (with a reason) one suggested code',
      handlers: [
        async (req, res) => {
          const id = studyIdOf(req);
          const input = parseOrThrow(decideCodeSchema, req.body, 'The decision');
          res.json(await decideCode(dataSource, id, input, actorOf(req)));
        },
      ],
    },
    {
      method: 'post',
      path: '/coding/studies/:id/codes',
      access: 'coding:review',
      summary: 'Add a code the suggestions missed, with a reason',
      handlers: [
        async (req, res) => {
          const id = studyIdOf(req);
          const input = parseOrThrow(addCodeSchema, req.body, 'The added code');
          res.status(201).json(await addCode(dataSource, id, input, actorOf(req)));
        },
      ],
    },
    {
      method: 'post',
      path: '/coding/studies/:id/complete',
      access: 'coding:review',
      summary: 'Complete the review (every code decided, no blocking warning): records who and when',
      handlers: [
        async (req, res) => {
          const id = studyIdOf(req);
          const { setId } = parseOrThrow(completeReviewSchema, req.body, 'The completion');
          res.json(await completeReview(dataSource, id, setId, actorOf(req)));
        },
      ],
    },
    {
      method: 'get',
      path: '/coding/export',
      access: 'coding:read',
      summary: 'The reviewed codes of the studies coded between two days, as CSV (default) or JSON',
      handlers: [
        async (req, res) => {
          const { from, to, format } = parseOrThrow(codeExportQuerySchema, req.query, 'The export query');
          await exportReviewedCodes(dataSource, { from, to, format }, auditContext(req), res, () => {
            if (format === 'json') res.type('application/json; charset=utf-8');
            else res.type('text/csv; charset=utf-8').attachment(`codes-${from}-${to}.csv`);
          });
        },
      ],
    },
  ];
}
