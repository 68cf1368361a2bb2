import path from 'node:path';
import { z } from 'zod';

/**
 * Server configuration from the environment. Everything has a default so that `npm start` works on a
 * fresh clone; SMTP is off unless SMTP_HOST is set, in which case mail goes to that server instead of
 * the in-process fake one.
 */
const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  PORT: z.coerce.number().int().min(0).max(65535).default(3000),
  HOST: z.string().default('0.0.0.0'),
  DATA_DIR: z.string().default('./data'),
  APP_URL: z.string().url().optional(),
  SESSION_SECRET: z.string().min(16).optional(),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  SMTP_HOST: z.string().optional(),
  SMTP_PORT: z.coerce.number().int().positive().default(587),
  SMTP_SECURE: z.enum(['true', 'false']).default('false'),
  SMTP_USER: z.string().optional(),
  SMTP_PASS: z.string().optional(),
  MAIL_FROM: z.string().default('Lumenbook <lumenbook@localhost>'),
  DEMO_DATA: z.enum(['true', 'false']).default('true'),
  /** Sign-in attempts per client per 15 minutes. */
  LOGIN_RATE_LIMIT: z.coerce.number().int().min(1).default(10),
});

export type Env = z.infer<typeof envSchema>;

export interface Config {
  production: boolean;
  port: number;
  host: string;
  dataDir: string;
  appUrl: string;
  sessionSecret: string | undefined;
  logLevel: Env['LOG_LEVEL'];
  smtp: { host: string; port: number; secure: boolean; user?: string; pass?: string } | null;
  mailFrom: string;
  demoData: boolean;
  loginRateLimit: number;
}

export function loadConfig(source: NodeJS.ProcessEnv = process.env): Config {
  const parsed = envSchema.safeParse(source);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`);
    throw new Error(`Invalid environment:\n${lines.join('\n')}`);
  }
  const env = parsed.data;
  return {
    production: env.NODE_ENV === 'production',
    port: env.PORT,
    host: env.HOST,
    dataDir: path.resolve(env.DATA_DIR),
    appUrl: env.APP_URL ?? `http://localhost:${env.PORT}`,
    sessionSecret: env.SESSION_SECRET,
    logLevel: env.LOG_LEVEL,
    smtp: env.SMTP_HOST
      ? { host: env.SMTP_HOST, port: env.SMTP_PORT, secure: env.SMTP_SECURE === 'true', user: env.SMTP_USER, pass: env.SMTP_PASS }
      : null,
    mailFrom: env.MAIL_FROM,
    demoData: env.DEMO_DATA === 'true',
    loginRateLimit: env.LOGIN_RATE_LIMIT,
  };
}
