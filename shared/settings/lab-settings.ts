import { z } from 'zod';

/**
 * The lab's own settings, kept in one row and changed by the admin. The same schema checks the
 * admin's form (zodResolver) and the server's request.
 */

/** Whether the runtime knows this IANA time zone name (Intl throws a RangeError for an unknown one). */
export function isTimeZone(name: string): boolean {
  if (!/^[A-Za-z][A-Za-z0-9_+\-/]*$/.test(name)) return false;
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: name });
    return true;
  } catch {
    return false;
  }
}

/** A report template version name: `v` and a number, as the folders in `templates/report/` are named. */
export const templateVersionPattern = /^v\d{1,4}$/;

/** "isobar@hospital.example" or "Cath lab reports <isobar@hospital.example>" (RFC 5322 name-addr, simplified). */
// One address only: no comma, semicolon or colon in the name, which would add a second sender or
// turn the name into a group.
const mailbox = /^(?:[^<>\r\n",;:]{1,100} )?<?[A-Za-z0-9._%+-]+@[A-Za-z0-9.-]+(?:\.[A-Za-z]{2,})?>?$/;
const bracketsBalanced = (s: string) => s.includes('<') === s.includes('>') && (!s.includes('<') || s.trim().endsWith('>'));

export const labSettingsFormSchema = z.strictObject(
  {
    timeZone: z
      .string({ error: 'Time zone is required.' })
      .trim()
      .min(1, { error: 'Time zone is required, e.g. Europe/Oslo or America/Chicago.' })
      .max(64)
      .refine(isTimeZone, { error: 'Time zone must be an IANA time zone name, e.g. Europe/Oslo or America/Chicago.' }),
    signatureTargetHours: z
      .number({ error: 'Signature target must be a number of hours.' })
      .min(1, { error: 'Signature target must be at least 1 hour.' })
      .max(168, { error: 'Signature target must be at most 168 hours (7 days).' })
      .refine((n) => Number.isInteger(n * 2), { error: 'Signature target must be in whole or half hours.' }),
    /** null: the server's configured EHR endpoint (EHR_FHIR_URL). */
    ehrBaseUrl: z
      .string({ error: 'EHR endpoint must be a URL.' })
      .trim()
      .max(500, { error: 'EHR endpoint is too long (at most 500 characters).' })
      .refine((s) => {
        try {
          const u = new URL(s);
          return (u.protocol === 'https:' || u.protocol === 'http:') && !u.username && !u.password && !u.search && !u.hash;
        } catch {
          return false;
        }
      }, { error: 'EHR endpoint must be an http(s) URL without credentials, query or fragment, e.g. https://ehr.example.org/fhir.' })
      .nullable(),
    /** null: the server's configured sender (MAIL_FROM). */
    mailFrom: z
      .string({ error: 'Mail sender must be an address.' })
      .trim()
      .max(200, { error: 'Mail sender is too long (at most 200 characters).' })
      .refine((s) => mailbox.test(s) && bracketsBalanced(s), { error: 'Mail sender must be an address, e.g. reports@hospital.example or Cath lab <reports@hospital.example>.' })
      .nullable(),
  },
  { error: (iss) => (iss.code === 'unrecognized_keys' ? `Unknown setting(s): ${(iss.keys as string[]).join(', ')}.` : 'Settings must be an object.') },
);
export type LabSettingsForm = z.infer<typeof labSettingsFormSchema>;

/** Every setting as the server applies it (stored values, or the server's configuration where none is stored). */
export interface LabSettings {
  timeZone: string;
  signatureTargetHours: number;
  ehrBaseUrl: string;
  mailFrom: string;
  templateVersion: string;
}

/**
 * What the turnaround figures need of the lab's settings: the IANA time zone weeks and day ranges are
 * counted in, and the signature target after which an unsigned study is overdue.
 */
export type TurnaroundSettings = Pick<LabSettings, 'timeZone' | 'signatureTargetHours'>;

/** What the admin screen reads: the stored values (null = configuration), what applies, and the configuration. */
export interface LabSettingsView {
  stored: LabSettingsForm & { templateVersion: string };
  effective: LabSettings;
  configured: { ehrBaseUrl: string; mailFrom: string };
  updatedAt: string | null;
  updatedBy: string | null;
  version: number;
}

export const labSettingsUpdateSchema = z.strictObject({
  settings: labSettingsFormSchema,
  /** The version the admin read: a change since then is refused (409). */
  version: z.number({ error: 'version is required: the settings version you read.' }).int().min(1),
});

export const templateActivationSchema = z.strictObject({
  version: z.string({ error: 'version must be a template version, e.g. v2.' }).regex(templateVersionPattern, { error: 'version must be a template version, e.g. v2.' }),
});
