import type { TaskList } from 'graphile-worker';
import { z } from 'zod';
import { sqlOfClient } from './sql';
import { storeSuggestions } from './store-suggestions';

const payloadSchema = z.object({ reportVersionId: z.uuid() });

/**
 * `suggest-codes { reportVersionId }`: makes a version's code suggestions and puts the study on the
 * coding queue. Signing does this itself, inside its transaction (`signStudy`); the task stays
 * for jobs queued before that and for making a version's suggestions again by hand. Safe to repeat:
 * a version that already has its suggestions is left alone.
 */
export const codingTasks: TaskList = {
  'suggest-codes': async (payload, helpers) => {
    const { reportVersionId } = payloadSchema.parse(payload);
    const stored = await helpers.withPgClient(async (client) => {
      await client.query('BEGIN');
      try {
        const result = await storeSuggestions(sqlOfClient(client), reportVersionId);
        await client.query('COMMIT');
        return result;
      } catch (error) {
        await client.query('ROLLBACK');
        throw error;
      }
    });
    helpers.logger.info(
      stored.created
        ? `Code suggestions for report version ${reportVersionId}: ${stored.codes} code(s)${stored.queued ? ', study queued for coding' : ', review unchanged'}`
        : `Report version ${reportVersionId} already has its code suggestions`,
    );
  },
};
