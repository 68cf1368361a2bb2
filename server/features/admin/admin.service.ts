import path from 'node:path';
import type { FeatureDeps } from '../../deps';
import { writeAudit } from '../../db/audit';
import { createBackup } from '../../db/backup';
import { deleteSetting, listOutboxRows, putSetting } from './admin.repo';
import type { ListQuery } from '../../../shared/schemas/common';
import { readShopSettings } from '../../db/shop-settings';
import { labelAddress } from '../../../shared/trials/label-address';
import { type OutboxMessage, type SettingsResponse, type ShopSettings, type UpdateShopSettingsInput } from '../../../shared/schemas/admin';
import type { User } from '../../../shared/schemas/auth';

export function createAdminService(deps: FeatureDeps) {
  const { db, sqlite } = deps.database;

  function listOutbox(q: ListQuery): { items: OutboxMessage[]; page: number; pageSize: number; total: number } {
    const { rows, total } = listOutboxRows(db, { limit: q.pageSize, offset: (q.page - 1) * q.pageSize });
    return {
      items: rows.map((r) => ({ id: r.id, createdAt: r.createdAt, from: r.fromAddress, to: r.toAddress, subject: r.subject, text: r.textBody })),
      page: q.page,
      pageSize: q.pageSize,
      total,
    };
  }

  /** One archive of the database (SQLite's online backup API, consistent while the app writes) and the photos. */
  async function backup(actor: User): Promise<{ file: string; bytes: number }> {
    const made = await createBackup(sqlite, deps.config.dataDir, deps.now());
    writeAudit(db, { actorId: actor.id, action: 'backup', entity: 'database', entityId: path.basename(made.file), after: { photos: made.photos } });
    return { file: made.file, bytes: made.bytes };
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
          deleteSetting(tx, key);
          continue;
        }
        putSetting(tx, key, value, actor.id);
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
