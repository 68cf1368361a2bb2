import type { FeatureDeps } from '../../deps';
import { secureRouter } from '../../http/routes';
import { idParamsSchema } from '../../../shared/schemas/common';
import {
  createResinLotSchema,
  createResinSchema,
  createSpeciesSchema,
  resinListQuerySchema,
  resinLotListQuerySchema,
  speciesListQuerySchema,
  updateResinLotSchema,
  updateResinSchema,
  updateSpeciesSchema,
} from '../../../shared/schemas/reference';
import { optionsQuerySchema } from '../../../shared/schemas/options';
import { createReferenceService } from './reference.service';
import { lotOptions, resinOptions, speciesOptions } from './reference.repo';

export function referenceRoutes(deps: FeatureDeps) {
  const service = createReferenceService(deps);
  const r = secureRouter();

  // Species and resins are the shop's reference data: everyone reads, only the admin changes them.
  r.get('/species', { access: 'viewer', schemas: { query: speciesListQuerySchema } }, ({ query }) => service.listSpecies(query));
  // Pickers' light lists, declared before the /:id routes so "options" is never taken for an id.
  const opts = { access: 'viewer', schemas: { query: optionsQuerySchema } } as const;
  r.get('/species/options', opts, ({ query }) => ({ items: speciesOptions(deps.database.db, query) }));
  r.get('/resins/options', opts, ({ query }) => ({ items: resinOptions(deps.database.db, query) }));
  r.get('/resin-lots/options', opts, ({ query }) => ({ items: lotOptions(deps.database.db, query) }));
  r.get('/species/:id', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ params }) => ({ species: service.getSpecies(params.id) }));
  r.post('/species', { access: 'admin', status: 201, schemas: { body: createSpeciesSchema } }, ({ user, body }) => ({
    species: service.createSpecies(user, body),
  }));
  r.patch('/species/:id', { access: 'admin', schemas: { params: idParamsSchema, body: updateSpeciesSchema } }, ({ user, params, body }) => ({
    species: service.updateSpecies(user, params.id, body),
  }));

  r.get('/resins', { access: 'viewer', schemas: { query: resinListQuerySchema } }, ({ query }) => service.listResins(query));
  r.get('/resins/:id', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ params }) => ({ resin: service.getResin(params.id) }));
  r.post('/resins', { access: 'admin', status: 201, schemas: { body: createResinSchema } }, ({ user, body }) => ({
    resin: service.createResin(user, body),
  }));
  r.patch('/resins/:id', { access: 'admin', schemas: { params: idParamsSchema, body: updateResinSchema } }, ({ user, params, body }) => ({
    resin: service.updateResin(user, params.id, body),
  }));

  // Lots are activated, drained back and used up at the bench, so technicians (and above) write them.
  r.get('/resin-lots', { access: 'viewer', schemas: { query: resinLotListQuerySchema } }, ({ query }) => service.listLots(query));
  r.get('/resin-lots/:id', { access: 'viewer', schemas: { params: idParamsSchema } }, ({ params }) => ({ lot: service.getLot(params.id) }));
  r.post('/resin-lots', { access: 'technician', status: 201, schemas: { body: createResinLotSchema } }, ({ user, body }) => ({
    lot: service.createLot(user, body),
  }));
  r.patch('/resin-lots/:id', { access: 'technician', schemas: { params: idParamsSchema, body: updateResinLotSchema } }, ({ user, params, body }) => ({
    lot: service.updateLot(user, params.id, body),
  }));

  return r;
}
