import crypto from 'node:crypto';
import bcrypt from 'bcryptjs';
import type { FeatureDeps } from '../../deps';
import { writeAudit } from '../../db/audit';
import { Conflict, NotFound, Unauthenticated, ValidationFailed } from '../../http/errors';
import type { InvitationPreview, UpdatePreferencesInput, User } from '../../../shared/schemas/auth';
import { prefsOverrides, unitPrefs } from '../../../shared/units';
import type { AdminUser, InviteUserInput, UpdateUserInput } from '../../../shared/schemas/admin';
import type { ListQuery } from '../../../shared/schemas/common';
import {
  countPendingTokens,
  findInvitation,
  findLiveToken,
  findUserByEmail,
  findUserById,
  insertToken,
  insertUser,
  listUserRows,
  markTokenUsed,
  retireTokens,
  setUserPassword,
  toUser,
  updateUserPreferences,
  updateUserRow,
  USER_SORTS,
  type UserSort,
} from './auth.repo';
import { hashToken, newToken } from './tokens';

const INVITATION_HOURS = 72;
const RESET_HOURS = 1;

export function createAuthService(deps: FeatureDeps) {
  const { db } = deps.database;
  const iso = () => deps.now().toISOString();
  const later = (hours: number) => new Date(deps.now().getTime() + hours * 3600_000).toISOString();
  // Compared against when the e-mail is unknown (or has no password yet), at the same cost as the
  // real hashes, so an unknown e-mail costs exactly as long as a wrong password.
  const dummyHash = bcrypt.hashSync(crypto.randomBytes(16).toString('hex'), deps.bcryptCost);

  async function verifyLogin(email: string, password: string): Promise<User> {
    const row = findUserByEmail(db, email);
    const ok = await bcrypt.compare(password, row?.passwordHash ?? dummyHash);
    // One answer for unknown e-mail, wrong password and disabled account: nothing to enumerate.
    if (!row || !row.passwordHash || !ok || row.disabled) throw new Unauthenticated('E-mail or password is not right');
    return toUser(row);
  }

  async function requestPasswordReset(email: string): Promise<void> {
    const row = findUserByEmail(db, email);
    if (!row || row.disabled || !row.passwordHash) return;
    const { token, hash } = newToken();
    db.transaction((tx) => {
      retireTokens(tx, row.id, 'password-reset', iso());
      insertToken(tx, { userId: row.id, kind: 'password-reset', tokenHash: hash, expiresAt: later(RESET_HOURS), createdBy: null });
    });
    const link = `${deps.config.appUrl}/reset-password?token=${token}`;
    // Not awaited: the answer must not wait for the mail server only when the account exists.
    deps.mailer.sendInBackground({
      to: row.email,
      subject: 'Reset your Lumenbook password',
      text: `Someone asked to reset the Lumenbook password for ${row.email}.\n\nTo choose a new password, open this link within ${RESET_HOURS} hour:\n${link}\n\nIf it was not you, ignore this message; your password stays as it is.`,
    });
  }

  async function confirmPasswordReset(token: string, password: string): Promise<void> {
    const found = findLiveToken(db, hashToken(token), 'password-reset', iso());
    if (!found) throw new ValidationFailed('This reset link is not valid any more; ask for a new one', { token: ['Link expired or already used'] });
    const hashPw = await bcrypt.hash(password, deps.bcryptCost);
    db.transaction((tx) => {
      markTokenUsed(tx, found.id, iso());
      setUserPassword(tx, found.userId, hashPw);
      writeAudit(tx, { actorId: found.userId, action: 'password-reset', entity: 'user', entityId: found.userId });
    });
    // Whoever held the old password loses their sessions.
    deps.sessions.destroyUserSessions(found.userId);
  }

  async function acceptInvitation(token: string, password: string, name: string): Promise<User> {
    const found = findLiveToken(db, hashToken(token), 'invitation', iso());
    if (!found)
      throw new ValidationFailed('This invitation link is not valid any more; ask the admin for a new one', { token: ['Link expired or already used'] });
    // A disabled account cannot take the invitation, and the link is not used up by trying: if the
    // admin enables the account again, the same link still works.
    if (findUserById(db, found.userId)?.disabled) throw new Unauthenticated('This account is disabled; ask the admin to enable it, then open the link again');
    const hashPw = await bcrypt.hash(password, deps.bcryptCost);
    const row = db.transaction((tx) => {
      markTokenUsed(tx, found.id, iso());
      setUserPassword(tx, found.userId, hashPw, name);
      writeAudit(tx, { actorId: found.userId, action: 'invitation-accepted', entity: 'user', entityId: found.userId });
      return findUserById(tx, found.userId);
    });
    if (!row || row.disabled) throw new Unauthenticated('This account is disabled');
    return toUser(row);
  }

  /**
   * A preset starts every quantity afresh; single choices go on top. Only the quantities that differ
   * from the preset are stored, so a later change of a preset's unit reaches everyone who kept it.
   */
  function updatePreferences(userId: number, input: UpdatePreferencesInput): User {
    const row = findUserById(db, userId);
    if (!row) throw new NotFound('User');
    const system = input.unitSystem ?? row.unitSystem;
    const start = input.unitSystem !== undefined ? unitPrefs(system) : toUser(row).units;
    const chosen = unitPrefs(start, input.units);
    const overrides = prefsOverrides(system, chosen);
    updateUserPreferences(db, userId, {
      name: input.name,
      unitSystem: system,
      unitOverrides: Object.keys(overrides).length === 0 ? null : overrides,
    });
    return toUser(findUserById(db, userId)!);
  }

  /** The invited person's name, e-mail and role, for a live invitation link; the link itself is the secret. */
  function previewInvitation(token: string): InvitationPreview {
    const found = findInvitation(db, hashToken(token), iso());
    if (!found || found.user.disabled) throw new NotFound('Invitation');
    return { email: found.user.email, name: found.user.name, role: found.user.role, expiresAt: found.expiresAt };
  }

  function listUsers(q: ListQuery): { items: AdminUser[]; page: number; pageSize: number; total: number } {
    const key = q.sort?.replace(/^-/, '') ?? 'name';
    if (!Object.hasOwn(USER_SORTS, key)) throw new ValidationFailed('Unknown sort field', { sort: [`Sort by one of ${Object.keys(USER_SORTS).join(', ')}`] });
    const { rows, total } = listUserRows(db, {
      sort: key as UserSort,
      descending: q.sort?.startsWith('-') ?? false,
      limit: q.pageSize,
      offset: (q.page - 1) * q.pageSize,
    });
    return {
      items: rows.map((r) => ({ ...toUser(r), createdAt: r.createdAt, invitationPending: r.passwordHash === null })),
      page: q.page,
      pageSize: q.pageSize,
      total,
    };
  }

  async function invite(actor: User, input: InviteUserInput): Promise<AdminUser> {
    const existing = findUserByEmail(db, input.email);
    if (existing && existing.passwordHash) throw new Conflict('A user with this e-mail already exists', { email: ['Already a user'] });
    const { token, hash } = newToken();
    const row = db.transaction((tx) => {
      let userId: number;
      if (existing) {
        // Re-inviting someone who never accepted: refresh name and role, retire the old link.
        updateUserRow(tx, existing.id, { name: input.name, role: input.role });
        retireTokens(tx, existing.id, 'invitation', iso());
        userId = existing.id;
      } else {
        userId = insertUser(tx, { email: input.email, name: input.name, role: input.role, createdBy: actor.id });
      }
      insertToken(tx, { userId, kind: 'invitation', tokenHash: hash, expiresAt: later(INVITATION_HOURS), createdBy: actor.id });
      writeAudit(tx, { actorId: actor.id, action: 'invite', entity: 'user', entityId: userId, after: { email: input.email, role: input.role } });
      return findUserById(tx, userId)!;
    });
    const link = `${deps.config.appUrl}/accept-invitation?token=${token}`;
    await deps.mailer.send({
      to: input.email,
      subject: 'You are invited to Lumenbook',
      text: `${actor.name} invited you to the shop's Lumenbook as ${input.role}.\n\nTo choose your password and sign in, open this link within ${INVITATION_HOURS} hours (it works once):\n${link}\n`,
    });
    return { ...toUser(row), createdAt: row.createdAt, invitationPending: true };
  }

  function updateUser(actor: User, id: number, input: UpdateUserInput): AdminUser {
    const before = findUserById(db, id);
    if (!before) throw new NotFound('User');
    if (id === actor.id && (input.disabled === true || (input.role && input.role !== 'admin'))) {
      throw new Conflict('You cannot disable yourself or take away your own admin role', {
        [input.disabled ? 'disabled' : 'role']: ['Not on your own account'],
      });
    }
    const row = db.transaction((tx) => {
      updateUserRow(tx, id, input);
      const after = findUserById(tx, id)!;
      writeAudit(tx, {
        actorId: actor.id,
        action: 'update',
        entity: 'user',
        entityId: id,
        before: { role: before.role, disabled: before.disabled },
        after: { role: after.role, disabled: after.disabled },
      });
      return after;
    });
    if (row.disabled) deps.sessions.destroyUserSessions(id);
    return { ...toUser(row), createdAt: row.createdAt, invitationPending: row.passwordHash === null };
  }

  function pendingTokenCount(): number {
    return countPendingTokens(db);
  }

  return {
    verifyLogin,
    requestPasswordReset,
    confirmPasswordReset,
    acceptInvitation,
    previewInvitation,
    updatePreferences,
    listUsers,
    invite,
    updateUser,
    pendingTokenCount,
  };
}
export type AuthService = ReturnType<typeof createAuthService>;
