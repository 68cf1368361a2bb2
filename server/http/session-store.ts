import type Database from 'better-sqlite3';
import session from 'express-session';
import { databaseBusy } from '../db/storage-errors';

/**
 * express-session store on the app's own SQLite file (the `sessions` table). We write our own small
 * store rather than use a published one: the SQLite store on npm is GPL-licensed and leaves an
 * interval timer running, which keeps test processes alive (docs/decisions/0002-sessions-in-sqlite.md).
 * Our pruning timer is unref'd and stopped by close().
 */
/** How far behind the session's new expiry the stored one may be before a touch writes it. */
export const TOUCH_SLACK_MS = 60 * 60 * 1000;

export class SqliteSessionStore extends session.Store {
  private readonly stmts;
  private readonly timer: NodeJS.Timeout;

  constructor(
    private readonly sqlite: Database.Database,
    private readonly defaultMaxAgeMs = 7 * 24 * 3600 * 1000,
    pruneEveryMs = 15 * 60 * 1000,
  ) {
    super();
    this.stmts = {
      get: sqlite.prepare<[string, number], { sess: string }>('SELECT sess FROM sessions WHERE sid = ? AND expires_at > ?'),
      set: sqlite.prepare(
        `INSERT INTO sessions (sid, sess, user_id, expires_at) VALUES (?, ?, ?, ?)
         ON CONFLICT(sid) DO UPDATE SET sess = excluded.sess, user_id = excluded.user_id, expires_at = excluded.expires_at`,
      ),
      // Only when the expiry moved by more than TOUCH_SLACK_MS: see touch().
      touch: sqlite.prepare('UPDATE sessions SET expires_at = ? WHERE sid = ? AND expires_at < ?'),
      destroy: sqlite.prepare('DELETE FROM sessions WHERE sid = ?'),
      prune: sqlite.prepare('DELETE FROM sessions WHERE expires_at <= ?'),
      destroyUser: sqlite.prepare('DELETE FROM sessions WHERE user_id = ?'),
    };
    this.timer = setInterval(() => this.prune(), pruneEveryMs);
    this.timer.unref();
  }

  private expiry(sess: session.SessionData): number {
    const expires = sess.cookie?.expires;
    return expires ? new Date(expires).getTime() : Date.now() + this.defaultMaxAgeMs;
  }

  override get(sid: string, cb: (err: unknown, session?: session.SessionData | null) => void): void {
    try {
      const row = this.stmts.get.get(sid, Date.now());
      cb(null, row ? (JSON.parse(row.sess) as session.SessionData) : null);
    } catch (err) {
      cb(err);
    }
  }

  override set(sid: string, sess: session.SessionData, cb?: (err?: unknown) => void): void {
    try {
      this.stmts.set.run(sid, JSON.stringify(sess), sess.userId ?? null, this.expiry(sess));
      cb?.();
    } catch (err) {
      cb?.(err);
    }
  }

  /**
   * express-session touches the session on every answered request. Writing the new expiry each time made
   * every read a database write (a WAL commit, and a checkpoint every few hundred requests, which showed as
   * event-loop stalls under load). The stored expiry is moved only when it is more than TOUCH_SLACK_MS
   * behind, so a 7-day session ends at most that much earlier than the cookie says.
   */
  override touch(sid: string, sess: session.SessionData, cb?: (err?: unknown) => void): void {
    try {
      const expiry = this.expiry(sess);
      this.stmts.touch.run(expiry, sid, expiry - TOUCH_SLACK_MS);
      cb?.();
    } catch (err) {
      // Every signed-in request touches its session. While an import's commit holds the write lock
      // (a worker thread, a few seconds) the touch is skipped rather than failing a read: the session
      // keeps its earlier expiry, which the next request extends.
      if (databaseBusy(err)) cb?.();
      else cb?.(err);
    }
  }

  override destroy(sid: string, cb?: (err?: unknown) => void): void {
    try {
      this.stmts.destroy.run(sid);
      cb?.();
    } catch (err) {
      cb?.(err);
    }
  }

  /** Ends every session of one user (used when a user is disabled or resets the password). */
  destroyUserSessions(userId: number): number {
    return this.stmts.destroyUser.run(userId).changes;
  }

  prune(): void {
    if (this.sqlite.open) this.stmts.prune.run(Date.now());
  }

  close(): void {
    clearInterval(this.timer);
  }
}
