import type { DataSource } from 'typeorm';
import type { Config } from '../config';
import { deliveryTasks } from '../ehr/tasks';
import { codingTasks } from '../coding/tasks';
import { sendReportNoticeTask } from '../mail/send-report-notice';
import { sendDeliveryFailureNoticeTask } from '../mail/send-delivery-failure-notice';
import { overdueCronItems, queueOverdueNoticesTask, sendOverdueNoticeTask } from '../turnaround/overdue-notices';
import type { CronItem, TaskList } from './worker';

/** Recurring tasks, scheduled by the queue itself (graphile-worker's cron): no polling loop of our own. */
export const cronItems: CronItem[] = [...overdueCronItems];

/**
 * Every background task the worker runs, by the name it is queued under (see `jobNames`). A task
 * without a handler yet stays queued until a release that has one. Every task reads and writes
 * through the app's DataSource (a task that needs a transaction opens one with
 * `dataSource.transaction`); graphile-worker's own connections only fetch and complete jobs.
 */
export function taskList(dataSource: DataSource, config: Config): TaskList {
  return {
    ...deliveryTasks(dataSource, config),
    ...codingTasks(dataSource),
    'send-report-notice': sendReportNoticeTask(dataSource, {
      host: config.mail.host,
      port: config.mail.port,
      from: config.mail.from,
      hospitalName: config.hospital.name,
    }),
    'send-delivery-failure-notice': sendDeliveryFailureNoticeTask(dataSource, { host: config.mail.host, port: config.mail.port, from: config.mail.from }),
    'queue-overdue-notices': queueOverdueNoticesTask(dataSource),
    'send-overdue-notice': sendOverdueNoticeTask(dataSource, { host: config.mail.host, port: config.mail.port, from: config.mail.from, publicUrl: config.publicUrl }),
  };
}
