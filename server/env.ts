import net from 'node:net';
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
  /** Failed sign-ins per account per 15 minutes (correct ones are not counted). */
  LOGIN_RATE_LIMIT: z.coerce.number().int().min(1).default(10),
  /** Failed sign-ins per client address per 15 minutes, whatever the accounts tried. */
  LOGIN_RATE_LIMIT_PER_ADDRESS: z.coerce.number().int().min(1).default(30),
  /** The reverse proxies whose X-Forwarded-* headers are believed (addresses, subnets or loopback). */
  TRUST_PROXY: z.string().max(500).default(''),
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
  loginRateLimitPerAddress: number;
  /** Express's `trust proxy`: false, or the named proxies only (never "everyone"). */
  trustProxy: false | string[];
}

const PROXY_PRESETS = new Set(['loopback', 'linklocal', 'uniquelocal']);

/**
 * TRUST_PROXY lists the proxies in front of the server: IP addresses, subnets (10.0.0.0/8) or the
 * names loopback, linklocal, uniquelocal. "true" and hop counts are refused: they would believe a
 * client's forged X-Forwarded-For whenever no proxy is in front.
 */
export function parseTrustProxy(value: string): false | string[] {
  const items = value
    .split(',')
    .map((s) => s.trim())
    .filter(Boolean);
  if (items.length === 0 || (items.length === 1 && items[0] === 'false')) return false;
  for (const item of items) {
    const [addr, bits, extra] = item.split('/');
    const ipVersion = net.isIP(addr ?? '');
    const okBits = bits === undefined || (/^\d{1,3}$/.test(bits) && Number(bits) <= (ipVersion === 6 ? 128 : 32));
    if (PROXY_PRESETS.has(item) || (ipVersion !== 0 && okBits && extra === undefined)) continue;
    throw new Error(
      `Invalid environment:\n  TRUST_PROXY: "${item}" is not a proxy address, subnet or one of loopback, linklocal, uniquelocal ` +
        '(name the proxy in front of the server, e.g. TRUST_PROXY=127.0.0.1; "true" and hop counts are refused)',
    );
  }
  return items;
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
    smtp: env.SMTP_HOST ? { host: env.SMTP_HOST, port: env.SMTP_PORT, secure: env.SMTP_SECURE === 'true', user: env.SMTP_USER, pass: env.SMTP_PASS } : null,
    mailFrom: env.MAIL_FROM,
    demoData: env.DEMO_DATA === 'true',
    loginRateLimit: env.LOGIN_RATE_LIMIT,
    loginRateLimitPerAddress: env.LOGIN_RATE_LIMIT_PER_ADDRESS,
    trustProxy: parseTrustProxy(env.TRUST_PROXY),
  };
}
