import type { TaskList } from 'graphile-worker';
import type { DataSource } from 'typeorm';
import { z } from 'zod';
import { storeSuggestions } from './store-suggestions';

const payloadSchema = z.object({ reportVersionId: z.uuid() });

/**
 * `suggest-codes { reportVersionId }`: makes a version's code suggestions and puts the study on the
 * coding queue, in one transaction of its own on the app's DataSource. Signing does this itself,
 * inside its transaction (`signStudy`); the task stays for jobs queued before that and for making a
 * version's suggestions again by hand. Safe to repeat: a version that already has its suggestions is
 * left alone (so a commit followed by a failure to mark the job done only repeats a no-op).
 */
export function codingTasks(dataSource: DataSource): TaskList {
  return {
    'suggest-codes': async (payload, helpers) => {
      const { reportVersionId } = payloadSchema.parse(payload);
      const stored = await dataSource.transaction((manager) => storeSuggestions(manager, reportVersionId));
      helpers.logger.info(
        stored.created
          ? `Code suggestions for report version ${reportVersionId}: ${stored.codes} code(s)${stored.queued ? ', study queued for coding' : ', review unchanged'}`
          : `Report version ${reportVersionId} already has its code suggestions`,
      );
    },
  };
}
