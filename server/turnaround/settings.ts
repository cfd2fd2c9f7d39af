import type { LabSettings } from '../settings/lab-settings';

/**
 * What the turnaround figures need of the lab's settings (`labSettings()`, kept by the admin): the
 * IANA time zone weeks and day ranges are counted in, and the signature target after which an
 * unsigned study is overdue.
 */
export type TurnaroundSettings = Pick<LabSettings, 'timeZone' | 'signatureTargetHours'>;
