import { and, asc, count, desc, eq, gt, isNull, lte, sql } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { once } from '../../db/prepared';
import { authTokens, loginFailures, users, AUTH_TOKEN_KINDS, LOGIN_FAILURE_SCOPES } from '../../db/schema/auth';
import type { User } from '../../../shared/schemas/auth';
import { unitPrefs } from '../../../shared/units';

export type UserRow = typeof users.$inferSelect;
export type TokenKind = (typeof AUTH_TOKEN_KINDS)[number];

export function toUser(row: UserRow): User {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    role: row.role,
    unitSystem: row.unitSystem,
    units: unitPrefs(row.unitSystem, row.unitOverrides),
    disabled: row.disabled,
  };
}

export function findUserByEmail(db: Db, email: string): UserRow | undefined {
  return db.select().from(users).where(eq(users.email, email)).get();
}

/** Read on every signed-in request (who is asking): prepared once per database. */
export function findUserById(db: Db, id: number): UserRow | undefined {
  return once(db, 'auth.findUserById', () =>
    db
      .select()
      .from(users)
      .where(eq(users.id, sql.placeholder('id')))
      .prepare(),
  ).get({ id });
}

export function insertToken(db: Db, values: { userId: number; kind: TokenKind; tokenHash: string; expiresAt: string; createdBy: number | null }) {
  db.insert(authTokens).values(values).run();
}

/** A token that is of this kind, not used and not expired at `nowIso`. */
export function findLiveToken(db: Db, tokenHash: string, kind: TokenKind, nowIso: string) {
  return db
    .select()
    .from(authTokens)
    .where(and(eq(authTokens.tokenHash, tokenHash), eq(authTokens.kind, kind), isNull(authTokens.usedAt), gt(authTokens.expiresAt, nowIso)))
    .get();
}

export function markTokenUsed(db: Db, id: number, nowIso: string) {
  db.update(authTokens).set({ usedAt: nowIso }).where(eq(authTokens.id, id)).run();
}

/** Earlier unused tokens of the same kind stop working when a new one is issued. */
export function retireTokens(db: Db, userId: number, kind: TokenKind, nowIso: string) {
  db.update(authTokens)
    .set({ usedAt: nowIso })
    .where(and(eq(authTokens.userId, userId), eq(authTokens.kind, kind), isNull(authTokens.usedAt)))
    .run();
}

/** Sets a user's name and units: the preset and the quantities chosen differently from it. */
export function updateUserPreferences(
  db: Db,
  id: number,
  values: { name?: string; unitSystem?: UserRow['unitSystem']; unitOverrides?: UserRow['unitOverrides'] },
) {
  db.update(users).set(values).where(eq(users.id, id)).run();
}

/** Sets a user's password hash (and, on accepting an invitation, the name they chose). */
export function setUserPassword(db: Db, id: number, passwordHash: string, name?: string) {
  db.update(users)
    .set(name === undefined ? { passwordHash } : { passwordHash, name })
    .where(eq(users.id, id))
    .run();
}

/** A new user, without a password until the invitation is accepted; returns the id. */
export function insertUser(db: Db, values: { email: string; name: string; role: UserRow['role']; createdBy: number }): number {
  return db.insert(users).values(values).returning({ id: users.id }).get().id;
}

/** Name, role or the disabled flag, as the admin changes them. */
export function updateUserRow(db: Db, id: number, values: Partial<Pick<UserRow, 'name' | 'role' | 'disabled'>>) {
  db.update(users).set(values).where(eq(users.id, id)).run();
}

/** What the users list may be sorted by. */
export const USER_SORTS = { name: users.name, email: users.email, role: users.role, createdAt: users.createdAt } as const;
export type UserSort = keyof typeof USER_SORTS;

/** One page of users in the given order (ties by id), and how many there are in all. */
export function listUserRows(db: Db, q: { sort: UserSort; descending: boolean; limit: number; offset: number }): { rows: UserRow[]; total: number } {
  const column = USER_SORTS[q.sort];
  const rows = db
    .select()
    .from(users)
    .orderBy(q.descending ? desc(column) : asc(column), asc(users.id))
    .limit(q.limit)
    .offset(q.offset)
    .all();
  const total = db.select({ n: count() }).from(users).get()?.n ?? 0;
  return { rows, total };
}

/** Invitation and reset links not used yet (expired ones included). */
export function countPendingTokens(db: Db): number {
  return (
    db
      .select({ n: count() })
      .from(authTokens)
      .where(sql`${authTokens.usedAt} IS NULL`)
      .get()?.n ?? 0
  );
}

/** The invitation a live token stands for, with the invited user's name, e-mail and role. */
export function findInvitation(db: Db, tokenHash: string, nowIso: string) {
  const token = findLiveToken(db, tokenHash, 'invitation', nowIso);
  if (!token) return undefined;
  const user = findUserById(db, token.userId);
  return user ? { user, expiresAt: token.expiresAt } : undefined;
}

export type LoginFailureScope = (typeof LOGIN_FAILURE_SCOPES)[number];

/** Failed sign-ins of this account or address since `sinceIso`. */
export function countLoginFailures(db: Db, scope: LoginFailureScope, key: string, sinceIso: string): number {
  return (
    db
      .select({ n: count() })
      .from(loginFailures)
      .where(and(eq(loginFailures.scope, scope), eq(loginFailures.key, key), gt(loginFailures.at, sinceIso)))
      .get()?.n ?? 0
  );
}

export function recordLoginFailure(db: Db, entries: { scope: LoginFailureScope; key: string }[], atIso: string, pruneBeforeIso: string): void {
  db.transaction((tx) => {
    tx.delete(loginFailures).where(lte(loginFailures.at, pruneBeforeIso)).run();
    for (const e of entries)
      tx.insert(loginFailures)
        .values({ ...e, at: atIso })
        .run();
  });
}

export function clearLoginFailures(db: Db, scope: LoginFailureScope, key: string): void {
  db.delete(loginFailures)
    .where(and(eq(loginFailures.scope, scope), eq(loginFailures.key, key)))
    .run();
}
