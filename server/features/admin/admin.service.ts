import fs from 'node:fs';
import path from 'node:path';
import { count, desc, eq } from 'drizzle-orm';
import type { FeatureDeps } from '../../deps';
import { writeAudit } from '../../db/audit';
import { outbox, settings } from '../../db/schema/admin';
import type { ListQuery } from '../../../shared/schemas/common';
import { readShopSettings } from '../../db/shop-settings';
import { labelAddress } from '../../../shared/trials/label-address';
import {
  type OutboxMessage,
  type SettingsResponse,
  type ShopSettings,
  type UpdateShopSettingsInput,
} from '../../../shared/schemas/admin';
import type { User } from '../../../shared/schemas/auth';

export function createAdminService(deps: FeatureDeps) {
  const { db, sqlite } = deps.database;

  function listOutbox(q: ListQuery): { items: OutboxMessage[]; page: number; pageSize: number; total: number } {
    const rows = db
      .select()
      .from(outbox)
      .orderBy(desc(outbox.id))
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize)
      .all();
    const total = db.select({ n: count() }).from(outbox).get()?.n ?? 0;
    return {
      items: rows.map((r) => ({ id: r.id, createdAt: r.createdAt, from: r.fromAddress, to: r.toAddress, subject: r.subject, text: r.textBody })),
      page: q.page,
      pageSize: q.pageSize,
      total,
    };
  }

  /** An online backup through SQLite's backup API: consistent even while the app keeps writing. */
  async function backup(actor: User): Promise<{ file: string; bytes: number }> {
    const dir = path.join(deps.config.dataDir, 'backups');
    fs.mkdirSync(dir, { recursive: true });
    const name = `lumenbook-${deps.now().toISOString().replace(/[:.]/g, '-')}.db`;
    const file = path.join(dir, name);
    await sqlite.backup(file);
    writeAudit(db, { actorId: actor.id, action: 'backup', entity: 'database', entityId: name });
    return { file: path.relative(deps.config.dataDir, file), bytes: fs.statSync(file).size };
  }

  function getSettings(): ShopSettings {
    return readShopSettings(db);
  }

  function updateSettings(actor: User, input: UpdateShopSettingsInput): ShopSettings {
    const before = getSettings();
    db.transaction((tx) => {
      for (const [key, value] of Object.entries(input)) {
        if (value === undefined) continue;
        // An emptied setting goes back to its default.
        if (value === null) {
          tx.delete(settings).where(eq(settings.key, key)).run();
          continue;
        }
        tx.insert(settings)
          .values({ key, value, createdBy: actor.id })
          .onConflictDoUpdate({ target: settings.key, set: { value } })
          .run();
      }
      writeAudit(tx, { actorId: actor.id, action: 'update', entity: 'settings', entityId: null, before, after: { ...before, ...input } });
    });
    return getSettings();
  }

  /** The settings with the address labels will use, so the admin sees it (and a loopback warning) where it is set. */
  function settingsAnswer(s: ShopSettings): SettingsResponse {
    return { settings: s, labelAddress: labelAddress(s.labelBaseUrl, deps.config.appUrl) };
  }

  return { listOutbox, backup, getSettings, updateSettings, settingsAnswer };
}
