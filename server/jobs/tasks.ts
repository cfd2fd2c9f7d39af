import type { DataSource } from 'typeorm';
import type { Config } from '../config';
import { deliveryTasks } from '../ehr/tasks';
import { codingTasks } from '../coding/tasks';
import { sendReportNoticeTask } from '../mail/send-report-notice';
import type { TaskList } from './worker';

/**
 * Every background task the worker runs, by the name it is queued under (see `jobNames`). A task
 * without a handler yet stays queued until a release that has one.
 */
export function taskList(dataSource: DataSource, config: Config): TaskList {
  return {
    ...deliveryTasks,
    ...codingTasks,
    'send-report-notice': sendReportNoticeTask(dataSource, {
      host: config.mail.host,
      port: config.mail.port,
      from: config.mail.from,
      hospitalName: config.hospital.name,
    }),
  };
}
