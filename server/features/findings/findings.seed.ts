import type { Db } from '../../db/client';
import { writeAudit } from '../../db/audit';
import type { Role } from '../../../shared/constants/roles';
import * as repo from './findings.repo';
import { plotSvgFromSnapshot } from './plot-svg';

interface DemoContext {
  tx: Db;
  userIds: Record<Role, number>;
  now: Date;
}

/** What the demo finding says and which saved view backs it; written by the composing seeder from the view's numbers. */
export interface DemoFinding {
  title: string;
  bodyMd: string;
  trialIds: number[];
  speciesIds: number[];
  resinIds: number[];
  savedViewId: number;
}

/**
 * One finding waiting for review, so a visitor can try the fourth everyday job at once: the demo
 * technician wrote it, attached a saved view as its evidence and submitted it; the demo reviewer can
 * read the evidence, comment, return or approve it. No e-mail is sent at seed time.
 */
export function seedFindingsDemo({ tx, userIds, now }: DemoContext, finding: DemoFinding): void {
  const view = repo.readSavedView(tx, finding.savedViewId);
  if (!view) return;
  const at = now.toISOString();
  const tech = userIds.technician;
  const id = repo.insertFinding(tx, finding, tech, at);
  writeAudit(tx, { actorId: tech, action: 'finding-created', entity: 'finding', entityId: id, after: { title: finding.title }, reason: 'demo seed' });
  const position = repo.insertEvidenceCopy(tx, id, view, plotSvgFromSnapshot(view.snapshot), tech, at);
  writeAudit(tx, {
    actorId: tech,
    action: 'evidence-attached',
    entity: 'finding',
    entityId: id,
    after: { savedViewId: view.id, position },
    reason: 'demo seed',
  });
  repo.markSubmitted(tx, id, 'in-review', tech, at);
  writeAudit(tx, { actorId: tech, action: 'finding-submitted', entity: 'finding', entityId: id, reason: 'demo seed' });
}
