import { DEFAULT_SHOP_SETTINGS, shopSettingsSchema, type ShopSettings } from '../../shared/schemas/admin';
import type { Db } from './client';
import { settings } from './schema/admin';

/**
 * The shop settings: stored keys over the defaults. Several features need them (altitude for the
 * gauge arithmetic, the drying rule, lot shelf life), so the read lives with the database, not in a
 * feature. A stored set that no longer validates falls back to the defaults.
 */
export function readShopSettings(db: Pick<Db, 'select'>): ShopSettings {
  const stored = Object.fromEntries(
    db
      .select()
      .from(settings)
      .all()
      .map((r) => [r.key, r.value]),
  );
  const parsed = shopSettingsSchema.safeParse({ ...DEFAULT_SHOP_SETTINGS, ...stored });
  return parsed.success ? parsed.data : DEFAULT_SHOP_SETTINGS;
}
