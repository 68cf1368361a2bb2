import type { FeatureDeps } from '../../deps';
import { secureRouter } from '../../http/routes';
import { listQuerySchema } from '../../../shared/schemas/common';
import { updateShopSettingsSchema } from '../../../shared/schemas/admin';
import { createAdminService } from './admin.service';

export function adminRoutes(deps: FeatureDeps) {
  const service = createAdminService(deps);
  const r = secureRouter();

  r.get('/admin/outbox', { access: 'admin', schemas: { query: listQuerySchema } }, ({ query }) => service.listOutbox(query));
  r.post('/admin/backup', { access: 'admin', status: 201 }, ({ user }) => service.backup(user));
  // Everyone reads the shop settings (runs need the altitude); only the admin changes them.
  r.get('/settings', { access: 'viewer' }, () => service.settingsAnswer(service.getSettings()));
  r.patch('/settings', { access: 'admin', schemas: { body: updateShopSettingsSchema } }, ({ user, body }) =>
    service.settingsAnswer(service.updateSettings(user, body)),
  );
  return r;
}
