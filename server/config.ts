import { z } from 'zod';
import { isRole, type Role } from '../shared/auth/permissions';
import { defaultLevel, logLevels, type LogLevel } from './log';

/**
 * Every setting the server reads, with a working default for local use.
 * Read once at start-up; a bad value stops the process with a message naming the variable.
 */
/**
 * Provider groups → Isobar roles, in order of precedence: a person in several mapped groups
 * gets the first role listed. A real hospital supplies its own table in ROLE_MAP.
 */
export const defaultRoleMap: Record<string, Role> = {
  'cardiology-physicians': 'physician',
  'cath-lab-staff': 'staff',
  'him-coding': 'coder',
  'cardiology-chiefs': 'chief',
  'isobar-administrators': 'admin',
};

const port = z.coerce.number().int().min(1).max(65535);

const configSchema = z
  .object({
    NODE_ENV: z.enum(['development', 'test', 'production']).default('development'),
    HOST: z.string().min(1).default('127.0.0.1'),
    PORT: port.default(8470),
    PUBLIC_URL: z.url().optional(),
    DATABASE_URL: z
      .string()
      .regex(/^postgres(ql)?:\/\//, 'must be a postgres:// URL')
      .default('postgres://isobar@127.0.0.1:54470/isobar'),
    MIGRATION_DATABASE_URL: z
      .string()
      .regex(/^postgres(ql)?:\/\//, 'must be a postgres:// URL')
      .default('postgres://isobar_owner@127.0.0.1:54470/isobar'),
    DATABASE_POOL_SIZE: z.coerce.number().int().min(1).max(100).default(10),
    SESSION_SECRET: z.string().min(32, 'must be at least 32 characters').default('local-development-secret-change-me-0123456789'),
    WEB_DIST: z.string().min(1).default('dist'),
    JSON_BODY_LIMIT: z.string().regex(/^\d+(b|kb|mb)$/i, 'must look like 100kb or 1mb').default('1mb'),
    OIDC_ISSUER: z.url().default('http://127.0.0.1:8471'),
    OIDC_CLIENT_ID: z.string().min(1).default('isobar'),
    OIDC_CLIENT_SECRET: z.string().min(1).default('local-development-client-secret'),
    OIDC_SCOPE: z.string().min(1).default('openid profile email roles'),
    ROLE_CLAIM: z.string().min(1).default('roles'),
    ROLE_MAP: z
      .string()
      .default(JSON.stringify(defaultRoleMap))
      .transform((text, ctx) => {
        try {
          const map = JSON.parse(text) as unknown;
          if (!map || typeof map !== 'object' || Array.isArray(map)) throw new Error();
          for (const [group, role] of Object.entries(map)) {
            if (!isRole(role)) {
              ctx.addIssue({ code: 'custom', message: `"${group}" maps to "${String(role)}", which is not a role` });
              return z.NEVER;
            }
          }
          return map as Record<string, Role>;
        } catch {
          ctx.addIssue({ code: 'custom', message: 'must be a JSON object of provider group → Isobar role' });
          return z.NEVER;
        }
      }),
    SESSION_IDLE_MINUTES: z.coerce.number().int().min(1).max(24 * 60).default(30),
    SESSION_MAX_HOURS: z.coerce.number().min(0.1).max(72).default(12),
    SIGN_IN_RATE_LIMIT: z.coerce.number().int().min(1).max(10_000).default(30),
    ALLOWED_ORIGINS: z.string().default(''),
    TRUST_PROXY: z
      .string()
      .default('')
      .refine((v) => v.split(',').every((p) => /^(loopback|linklocal|uniquelocal|[0-9a-fA-F:.]+(\/\d{1,3})?)$/.test(p.trim())) || v === '', {
        message: 'must be empty, or addresses/CIDR ranges (or loopback, linklocal, uniquelocal), comma-separated',
      }),
    ATTACHMENT_DIR: z.string().min(1).default('storage/attachments'),
    ATTACHMENT_MAX_MB: z.coerce.number().min(0.01).max(500).default(20),
    EHR_FHIR_URL: z.url().default('http://127.0.0.1:8472/fhir'),
    EHR_CLIENT_ID: z.string().min(1).default('isobar-ehr'),
    EHR_CLIENT_SECRET: z.string().min(1).default('local-development-ehr-secret'),
    EHR_SCOPE: z.string().min(1).default('system/Patient.write system/Encounter.write system/Observation.write system/DiagnosticReport.write'),
    EHR_TIMEOUT_SECONDS: z.coerce.number().min(1).max(600).default(30),
    /** Hosts the admin may point EHR delivery at (comma-separated), beside the configured endpoint's own. */
    EHR_ALLOWED_HOSTS: z.string().default(''),
    EHR_DELIVERY_LIMIT_HOURS: z.coerce.number().min(0.01).max(24 * 30).default(24),
    // Identifier systems of the hospital's MRNs, encounters and accession numbers (defaults: HL7's example OID root).
    EHR_PATIENT_ID_SYSTEM: z.string().min(1).default('urn:oid:2.16.840.1.113883.19.5.1'),
    EHR_ENCOUNTER_ID_SYSTEM: z.string().min(1).default('urn:oid:2.16.840.1.113883.19.5.2'),
    EHR_ACCESSION_SYSTEM: z.string().min(1).default('urn:oid:2.16.840.1.113883.19.5.3'),
    FAKE_EHR_PORT: port.default(8472),
    HOSPITAL_NAME: z.string().trim().min(1).max(200).default('Saltmarsh Bay Regional Hospital'),
    HOSPITAL_LAB: z.string().trim().max(200).default('Cardiac Catheterization Laboratory'),
    SIGN_REAUTH_MINUTES: z.coerce.number().int().min(1).max(720).default(10),
    AUDIT_PREVIEW_READ_SECONDS: z.coerce.number().int().min(0).max(86_400).default(600),
    SMTP_HOST: z.string().trim().min(1).default('127.0.0.1'),
    SMTP_PORT: port.default(8425),
    MAIL_FROM: z.string().trim().min(3).default('Isobar reports <isobar@localhost>'),
    FAKE_SMTP_HTTP_PORT: port.default(8426),
    /** Set by whoever runs real hospital services instead of the local stand-ins (see scripts/start.sh). */
    ISOBAR_NO_FAKES: z.string().optional(),
    /** The admin's caught-mail page is a development aid: on only when asked for (scripts/start.sh does). */
    CAUGHT_MAIL_PAGE: z.enum(['on', 'off']).default('off'),
    JOB_WORKER: z.enum(['on', 'off']).default('on'),
    ATTACHMENT_MAX_CONCURRENT: z.coerce.number().int().min(1).max(100).default(4),
    LOG_LEVEL: z.enum(logLevels).optional(),
  })
  .superRefine((value, ctx) => {
    if (value.NODE_ENV === 'production' && value.SESSION_SECRET.startsWith('local-development-secret')) {
      ctx.addIssue({ code: 'custom', path: ['SESSION_SECRET'], message: 'must be set in production' });
    }
  });

export interface Config {
  env: 'development' | 'test' | 'production';
  host: string;
  port: number;
  publicUrl: string;
  /** The server's role: rows only (see server/db/privileges.ts). */
  databaseUrl: string;
  /** The owner role: runs migrations (npm start and npm test do, before the server starts). */
  migrationDatabaseUrl: string;
  databasePoolSize: number;
  sessionSecret: string;
  webDist: string;
  jsonBodyLimit: string;
  oidc: { issuer: string; clientId: string; clientSecret: string; scope: string; roleClaim: string; roleMap: Record<string, Role> };
  session: { idleMinutes: number; maxHours: number; secure: boolean };
  signInRateLimit: number;
  /** Origins allowed to send state-changing requests: the public URL's, plus any listed. */
  allowedOrigins: string[];
  /** The EHR's FHIR endpoint and Isobar's client-credentials client at the identity provider. */
  ehr: {
    fhirBaseUrl: string;
    /** Hosts (host[:port]) an EHR endpoint set by the admin may name: the configured one's and EHR_ALLOWED_HOSTS. */
    allowedHosts: string[];
    clientId: string;
    clientSecret: string;
    scope: string;
    timeoutMs: number;
    /** Transient failures are retried until this long after the first try, then the delivery gives up. */
    deliveryLimitMs: number;
    /** Identifier systems of the hospital's patient MRNs, encounters and accession numbers. */
    identifierSystems: { patient: string; encounter: string; accession: string };
  };
  /** Port of the local stand-in EHR (`server/fakes/main.ts`). */
  fakeEhrPort: number;
  /** The hospital and lab printed on reports. */
  hospital: { name: string; lab: string };
  /** A signature needs a sign-in at most this many minutes old. */
  signReauthMinutes: number;
  /**
   * The live report preview is read again after every autosave: the audit trail records one read per
   * user, study and client address within this many seconds (0: every read).
   */
  auditPreviewReadSeconds: number;
  /** The mail relay for notices; locally the stand-in started by `server/fakes/main.ts`. */
  mail: {
    host: string;
    port: number;
    from: string;
    fakeHttpPort: number;
    /**
     * Where the local mail stand-in lists what it caught (the admin's development page reads it); null
     * when the stand-in is not in use: in production, with ISOBAR_NO_FAKES, or a relay not on loopback.
     */
    caughtMailUrl: string | null;
  };
  /** Whether this server process runs the background job worker. */
  jobWorker: boolean;
  attachments: { dir: string; maxBytes: number; maxConcurrentUploads?: number };
  /**
   * The reverse proxies whose X-Forwarded-For is believed (Express's `trust proxy`); none by default,
   * so a client cannot choose the address that is audited and rate-limited.
   */
  trustProxy: string[];
  /** pino level; `silent` under test unless LOG_LEVEL says otherwise. */
  logLevel: LogLevel;
}

export class ConfigError extends Error {
  constructor(public readonly problems: string[]) {
    super(`Invalid configuration:\n${problems.map((p) => `  - ${p}`).join('\n')}`);
    this.name = 'ConfigError';
  }
}

/** The local mail stand-in catches the mail: not in production, not with real services, only on loopback. */
function fakeMailInUse(v: { NODE_ENV: string; ISOBAR_NO_FAKES?: string; CAUGHT_MAIL_PAGE: 'on' | 'off'; SMTP_HOST: string }): boolean {
  return v.CAUGHT_MAIL_PAGE === 'on' && v.NODE_ENV !== 'production' && !v.ISOBAR_NO_FAKES && ['127.0.0.1', 'localhost', '::1'].includes(v.SMTP_HOST);
}

export function loadConfig(env: Record<string, string | undefined> = process.env): Config {
  // Empty variables count as unset, so `PORT= npm start` falls back to the default.
  const present = Object.fromEntries(Object.entries(env).filter(([, v]) => v !== undefined && v !== ''));
  const parsed = configSchema.safeParse(present);
  if (!parsed.success) {
    throw new ConfigError(parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`));
  }
  const v = parsed.data;
  const publicUrl = (v.PUBLIC_URL ?? `http://${v.HOST}:${v.PORT}`).replace(/\/$/, '');
  return {
    env: v.NODE_ENV,
    host: v.HOST,
    port: v.PORT,
    publicUrl,
    databaseUrl: v.DATABASE_URL,
    migrationDatabaseUrl: v.MIGRATION_DATABASE_URL,
    databasePoolSize: v.DATABASE_POOL_SIZE,
    sessionSecret: v.SESSION_SECRET,
    webDist: v.WEB_DIST,
    jsonBodyLimit: v.JSON_BODY_LIMIT,
    oidc: {
      issuer: v.OIDC_ISSUER.replace(/\/$/, ''),
      clientId: v.OIDC_CLIENT_ID,
      clientSecret: v.OIDC_CLIENT_SECRET,
      scope: v.OIDC_SCOPE,
      roleClaim: v.ROLE_CLAIM,
      roleMap: v.ROLE_MAP,
    },
    session: { idleMinutes: v.SESSION_IDLE_MINUTES, maxHours: v.SESSION_MAX_HOURS, secure: publicUrl.startsWith('https:') },
    signInRateLimit: v.SIGN_IN_RATE_LIMIT,
    allowedOrigins: [new URL(publicUrl).origin, ...v.ALLOWED_ORIGINS.split(',').map((o) => o.trim()).filter(Boolean)],
    ehr: {
      fhirBaseUrl: v.EHR_FHIR_URL.replace(/\/$/, ''),
      allowedHosts: [new URL(v.EHR_FHIR_URL).host, ...v.EHR_ALLOWED_HOSTS.split(',').map((h) => h.trim().toLowerCase()).filter(Boolean)],
      clientId: v.EHR_CLIENT_ID,
      clientSecret: v.EHR_CLIENT_SECRET,
      scope: v.EHR_SCOPE,
      timeoutMs: v.EHR_TIMEOUT_SECONDS * 1000,
      deliveryLimitMs: Math.round(v.EHR_DELIVERY_LIMIT_HOURS * 3_600_000),
      identifierSystems: { patient: v.EHR_PATIENT_ID_SYSTEM, encounter: v.EHR_ENCOUNTER_ID_SYSTEM, accession: v.EHR_ACCESSION_SYSTEM },
    },
    fakeEhrPort: v.FAKE_EHR_PORT,
    hospital: { name: v.HOSPITAL_NAME, lab: v.HOSPITAL_LAB },
    signReauthMinutes: v.SIGN_REAUTH_MINUTES,
    auditPreviewReadSeconds: v.AUDIT_PREVIEW_READ_SECONDS,
    mail: {
      host: v.SMTP_HOST,
      port: v.SMTP_PORT,
      from: v.MAIL_FROM,
      fakeHttpPort: v.FAKE_SMTP_HTTP_PORT,
      caughtMailUrl: fakeMailInUse(v) ? `http://${v.SMTP_HOST.includes(':') ? `[${v.SMTP_HOST}]` : v.SMTP_HOST}:${v.FAKE_SMTP_HTTP_PORT}/messages` : null,
    },
    jobWorker: v.JOB_WORKER === 'on',
    attachments: { dir: v.ATTACHMENT_DIR, maxBytes: Math.round(v.ATTACHMENT_MAX_MB * 1024 * 1024), maxConcurrentUploads: v.ATTACHMENT_MAX_CONCURRENT },
    trustProxy: v.TRUST_PROXY.split(',').map((p) => p.trim()).filter(Boolean),
    logLevel: v.LOG_LEVEL ?? defaultLevel({ NODE_ENV: v.NODE_ENV }),
  };
}
