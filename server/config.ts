import { z } from 'zod';

/**
 * Every setting the server reads, with a working default for local use.
 * Read once at start-up; a bad value stops the process with a message naming the variable.
 */
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
    DATABASE_POOL_SIZE: z.coerce.number().int().min(1).max(100).default(10),
    SESSION_SECRET: z.string().min(32, 'must be at least 32 characters').default('local-development-secret-change-me-0123456789'),
    WEB_DIST: z.string().min(1).default('dist'),
    JSON_BODY_LIMIT: z.string().regex(/^\d+(b|kb|mb)$/i, 'must look like 100kb or 1mb').default('1mb'),
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
  databaseUrl: string;
  databasePoolSize: number;
  sessionSecret: string;
  webDist: string;
  jsonBodyLimit: string;
}

export class ConfigError extends Error {
  constructor(public readonly problems: string[]) {
    super(`Invalid configuration:\n${problems.map((p) => `  - ${p}`).join('\n')}`);
    this.name = 'ConfigError';
  }
}

export function loadConfig(env: Record<string, string | undefined> = process.env): Config {
  // Empty variables count as unset, so `PORT= npm start` falls back to the default.
  const present = Object.fromEntries(Object.entries(env).filter(([, v]) => v !== undefined && v !== ''));
  const parsed = configSchema.safeParse(present);
  if (!parsed.success) {
    throw new ConfigError(parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`));
  }
  const v = parsed.data;
  return {
    env: v.NODE_ENV,
    host: v.HOST,
    port: v.PORT,
    publicUrl: (v.PUBLIC_URL ?? `http://${v.HOST}:${v.PORT}`).replace(/\/$/, ''),
    databaseUrl: v.DATABASE_URL,
    databasePoolSize: v.DATABASE_POOL_SIZE,
    sessionSecret: v.SESSION_SECRET,
    webDist: v.WEB_DIST,
    jsonBodyLimit: v.JSON_BODY_LIMIT,
  };
}
