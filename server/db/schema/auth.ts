import { index, integer, sqliteTable, text, uniqueIndex } from 'drizzle-orm/sqlite-core';
import { ROLES } from '../../../shared/constants/roles';
import { UNIT_SYSTEMS_LIST } from '../../../shared/constants/units';
import type { UnitPrefs } from '../../../shared/units';
import { createdAt, createdBy, id } from './columns';

export const AUTH_TOKEN_KINDS = ['invitation', 'password-reset'] as const;

export const users = sqliteTable(
  'users',
  {
    id: id(),
    email: text('email').notNull(),
    name: text('name').notNull(),
    role: text('role', { enum: ROLES }).notNull(),
    // Null until an invited user sets a password through the invitation link.
    passwordHash: text('password_hash'),
    /** The preset the user's units start from; `unit_overrides` holds the quantities chosen differently. */
    unitSystem: text('unit_system', { enum: UNIT_SYSTEMS_LIST }).notNull().default('metric'),
    unitOverrides: text('unit_overrides', { mode: 'json' }).$type<Partial<UnitPrefs>>(),
    disabled: integer('disabled', { mode: 'boolean' }).notNull().default(false),
    createdAt: createdAt(),
    createdBy: createdBy(),
  },
  (t) => [uniqueIndex('users_email_unique').on(t.email)],
);

/** express-session rows; `user_id` lets us drop every session of a user who is disabled. */
export const sessions = sqliteTable(
  'sessions',
  {
    sid: text('sid').primaryKey(),
    sess: text('sess').notNull(),
    userId: integer('user_id').references(() => users.id, { onDelete: 'cascade' }),
    expiresAt: integer('expires_at').notNull(),
    createdAt: createdAt(),
    createdBy: createdBy(),
  },
  (t) => [index('sessions_user_idx').on(t.userId), index('sessions_expires_idx').on(t.expiresAt)],
);

/** One-time tokens for invitations and password resets. Only the SHA-256 of the token is stored. */
export const authTokens = sqliteTable(
  'auth_tokens',
  {
    id: id(),
    userId: integer('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    kind: text('kind', { enum: AUTH_TOKEN_KINDS }).notNull(),
    tokenHash: text('token_hash').notNull(),
    expiresAt: text('expires_at').notNull(),
    usedAt: text('used_at'),
    createdAt: createdAt(),
    createdBy: createdBy(),
  },
  (t) => [uniqueIndex('auth_tokens_hash_unique').on(t.tokenHash), index('auth_tokens_user_idx').on(t.userId)],
);

export const LOGIN_FAILURE_SCOPES = ['account', 'address'] as const;

/**
 * Failed sign-ins, one row per scope (the e-mail tried, the client address), so the limit holds per
 * account across addresses and per address across accounts, and survives a restart. Correct sign-ins
 * are not counted.
 */
export const loginFailures = sqliteTable(
  'login_failures',
  {
    id: id(),
    scope: text('scope', { enum: LOGIN_FAILURE_SCOPES }).notNull(),
    key: text('key').notNull(),
    at: text('at').notNull(),
  },
  (t) => [index('login_failures_scope_key_at_idx').on(t.scope, t.key, t.at)],
);
