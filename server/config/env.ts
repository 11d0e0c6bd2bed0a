import { z } from 'zod';

const bool = z
  .enum(['true', 'false', '1', '0'])
  .transform((v) => v === 'true' || v === '1');

const envSchema = z.object({
  NODE_ENV: z
    .enum(['development', 'production', 'test'])
    .default('development'),
  PORT: z.coerce.number().int().min(0).max(65535).default(3210),
  HOST: z.string().default('127.0.0.1'),
  DATABASE_URL: z
    .string()
    .url()
    .default('postgres://postgres@127.0.0.1:54329/lamella'),
  PUBLIC_URL: z.string().url().optional(),
  SESSION_SECRET: z.string().min(16).optional(),
  TRUST_PROXY: z.string().default('false'),
  SMTP_URL: z.string().url().optional(),
  FAKE_SMTP_PORT: z.coerce.number().int().min(0).max(65535).default(2525),
  MAIL_FROM: z.string().default('Lamella <lamella@saltmarsh-general.example>'),
  UPLOADS_DIR: z.string().default('uploads'),
  MAX_FILE_MB: z.coerce.number().positive().default(200),
  MAX_FILES_PER_REQUEST: z.coerce.number().int().positive().default(500),
  SIGNIN_LIMIT_PER_ACCOUNT: z.coerce.number().int().positive().default(5),
  SIGNIN_LIMIT_PER_ADDRESS: z.coerce.number().int().positive().default(20),
  SIGNIN_WINDOW_MINUTES: z.coerce.number().positive().default(15),
  COOKIE_SECURE: bool.optional(),
});

export type Env = z.infer<typeof envSchema>;

/** Lamella's run-time settings, read once from the environment. */
export interface AppConfig {
  env: Env['NODE_ENV'];
  port: number;
  host: string;
  databaseUrl: string;
  /** Where links in e-mails point; also an allowed Origin for writes. */
  publicUrl: string;
  sessionSecret: string;
  trustProxy: boolean | number | string;
  smtpUrl: string | null;
  fakeSmtpPort: number;
  mailFrom: string;
  uploadsDir: string;
  maxFileBytes: number;
  maxFilesPerRequest: number;
  signInLimitPerAccount: number;
  signInLimitPerAddress: number;
  signInWindowMs: number;
  cookieSecure: boolean | 'auto';
}

function parseTrustProxy(value: string): boolean | number | string {
  if (value === 'true') return true;
  if (value === 'false') return false;
  return /^\d+$/.test(value) ? Number(value) : value;
}

/**
 * Parses the environment; throws at boot with every bad variable named.
 * @throws Error when a variable is present but invalid.
 */
export function loadConfig(source: NodeJS.ProcessEnv = process.env): AppConfig {
  const parsed = envSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map(
      (i) => `  ${i.path.join('.')}: ${i.message}`,
    );
    throw new Error(`Invalid environment:\n${lines.join('\n')}`);
  }
  const e = parsed.data;
  const publicUrl = e.PUBLIC_URL ?? `http://${e.HOST}:${e.PORT}`;
  return {
    env: e.NODE_ENV,
    port: e.PORT,
    host: e.HOST,
    databaseUrl: e.DATABASE_URL,
    publicUrl: publicUrl.replace(/\/$/, ''),
    // A fixed fallback keeps sessions valid across restarts of a local demo;
    // production deployments set SESSION_SECRET.
    sessionSecret: e.SESSION_SECRET ?? 'lamella-local-session-secret-change-me',
    trustProxy: parseTrustProxy(e.TRUST_PROXY),
    smtpUrl: e.SMTP_URL ?? null,
    fakeSmtpPort: e.FAKE_SMTP_PORT,
    mailFrom: e.MAIL_FROM,
    uploadsDir: e.UPLOADS_DIR,
    maxFileBytes: Math.round(e.MAX_FILE_MB * 1024 * 1024),
    maxFilesPerRequest: e.MAX_FILES_PER_REQUEST,
    signInLimitPerAccount: e.SIGNIN_LIMIT_PER_ACCOUNT,
    signInLimitPerAddress: e.SIGNIN_LIMIT_PER_ADDRESS,
    signInWindowMs: e.SIGNIN_WINDOW_MINUTES * 60_000,
    cookieSecure: e.COOKIE_SECURE ?? 'auto',
  };
}
