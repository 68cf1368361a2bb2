import bcrypt from 'bcryptjs';
import { eq, sql } from 'drizzle-orm';
import type { FeatureDeps } from '../../deps';
import type { Db } from '../../db/client';
import { writeAudit } from '../../db/audit';
import { findingEvidence, findingRevisions, findings, signatures } from '../../db/schema/findings';
import { wikiPages, wikiPageTags } from '../../db/schema/wiki';
import { AppError, Conflict, Forbidden, NotFound, ValidationFailed } from '../../http/errors';
import { markdownToText, renderMarkdown } from '../../markdown/render';
import type { User } from '../../../shared/schemas/auth';
import { CANONICAL_FORM, SIGNATURE_ALGORITHM, SIGNATURE_MEANING_LABELS, type FindingAction } from '../../../shared/constants/findings';
import { allowedActions, decide, type ReviewSubject } from '../../../shared/findings/review';
import type {
  ApproveFindingInput,
  AttachableView,
  CreateFindingInput,
  Evidence,
  Finding,
  FindingList,
  FindingListQuery,
  Revision,
  RevisionSummary,
  Signature,
  ThreadEntry,
  UpdateFindingInput,
  Verification,
} from '../../../shared/schemas/findings';
import * as repo from './findings.repo';
import { plotSvgFromSnapshot } from './plot-svg';
import { hashContent, sha256Hex, whatDiffers, type SignedContent } from './signing';

/** Saves by the same person within this many minutes fold into one revision of the draft. */
const FOLD_MINUTES = 10;

export function slugify(title: string): string {
  const base = title
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60)
    .replace(/-+$/g, '');
  return base || 'finding';
}

export function createFindingsService(deps: FeatureDeps, signingLimit: { windowMs: number; limit: number } = { windowMs: 15 * 60_000, limit: 5 }) {
  const { db } = deps.database;
  const iso = () => deps.now().toISOString();
  const link = (path: string) => `${deps.config.appUrl}${path}`;

  function load(id: number): repo.FindingRow {
    const row = repo.findFinding(db, id);
    if (!row) throw new NotFound('Finding');
    return row;
  }

  function subject(row: repo.FindingRow): ReviewSubject {
    return { state: row.state, authorId: row.createdBy, editorIds: repo.editorIds(db, row.id), hasNewerVersion: repo.nextVersionOf(db, row.id) !== undefined };
  }

  /** Enforces the shared review rules: 409 for the wrong state, 403 for the wrong role or person. */
  function enforce(row: repo.FindingRow, user: User, action: FindingAction) {
    const d = decide(subject(row), { id: user.id, role: user.role }, action);
    if (!d.allowed) throw d.status === 409 ? new Conflict(d.reason) : new Forbidden(d.reason);
    return d.next;
  }

  function checkRefs(input: { trialIds?: number[]; speciesIds?: number[]; resinIds?: number[] }) {
    const fieldErrors: Record<string, string[]> = {};
    const missing = (ids: number[] | undefined, found: { id: number }[]) => (ids ?? []).filter((i) => !found.some((f) => f.id === i));
    const t = missing(input.trialIds, repo.trialTitles(db, input.trialIds ?? []));
    const s = missing(input.speciesIds, repo.speciesNames(db, input.speciesIds ?? []));
    const r = missing(input.resinIds, repo.resinNames(db, input.resinIds ?? []));
    if (t.length) fieldErrors.trialIds = [`No trial with id ${t.join(', ')}`];
    if (s.length) fieldErrors.speciesIds = [`No species with id ${s.join(', ')}`];
    if (r.length) fieldErrors.resinIds = [`No resin with id ${r.join(', ')}`];
    if (Object.keys(fieldErrors).length) throw new ValidationFailed('Some linked records do not exist', fieldErrors);
  }

  // ---- answers ----

  function person(id: number, names: Map<number, string>) {
    return { id, name: names.get(id) ?? `user ${id}` };
  }

  function toEvidence(e: repo.EvidenceRow, names: Map<number, string>): Evidence {
    return {
      id: e.id,
      position: e.position,
      savedViewId: e.savedViewId,
      title: e.title,
      kind: e.kind,
      snapshot: e.snapshot,
      svg: e.svg,
      attachedAt: e.createdAt,
      attachedBy: person(e.createdBy, names),
    };
  }

  function toSignature(s: repo.SignatureRow, names: Map<number, string>): Signature {
    return {
      id: s.id,
      signer: person(s.signerId, names),
      signerName: s.signerName,
      meaning: s.meaning,
      meaningLabel: SIGNATURE_MEANING_LABELS[s.meaning],
      signedAt: s.signedAt,
      algorithm: SIGNATURE_ALGORITHM,
      canonicalForm: CANONICAL_FORM,
      contentHash: s.contentHash,
    };
  }

  function toFinding(row: repo.FindingRow, user: User): Finding {
    const evidence = repo.listEvidence(db, row.id);
    const thread = repo.listThread(db, row.id);
    const editors = repo.editorIds(db, row.id);
    const sig = repo.findSignature(db, row.id);
    const rev = repo.latestRevision(db, row.id);
    const names = repo.userNames(db, [
      row.createdBy,
      ...editors,
      ...evidence.map((e) => e.createdBy),
      ...thread.map((c) => c.createdBy),
      ...(sig ? [sig.signerId] : []),
    ]);
    const next = repo.nextVersionOf(db, row.id);
    const prev = row.supersedesId ? repo.findFinding(db, row.supersedesId) : undefined;
    const page = repo.findPageOfFinding(db, row.id);
    return {
      id: row.id,
      seriesId: row.seriesId,
      version: row.version,
      state: row.state,
      title: row.title,
      bodyMd: row.bodyMd,
      bodyHtml: renderMarkdown(row.bodyMd),
      trials: repo.trialTitles(db, row.trialIds),
      species: repo.speciesNames(db, row.speciesIds),
      resins: repo.resinNames(db, row.resinIds),
      author: person(row.createdBy, names),
      editors: editors.map((id) => person(id, names)),
      revision: rev?.revision ?? row.revision,
      savedAt: row.savedAt,
      createdAt: row.createdAt,
      submittedAt: row.submittedAt,
      evidence: evidence.map((e) => toEvidence(e, names)),
      thread: thread.map((c): ThreadEntry => ({
        id: c.id,
        kind: c.kind,
        author: person(c.createdBy, names),
        bodyMd: c.bodyMd,
        bodyHtml: renderMarkdown(c.bodyMd),
        createdAt: c.createdAt,
      })),
      signature: sig ? toSignature(sig, names) : null,
      wikiSlug: page?.slug ?? null,
      previousVersion: prev ? { id: prev.id, version: prev.version } : null,
      nextVersion: next ? { id: next.id, version: next.version, state: next.state } : null,
      actions: allowedActions(
        { state: row.state, authorId: row.createdBy, editorIds: editors, hasNewerVersion: next !== undefined },
        { id: user.id, role: user.role },
      ),
    };
  }

  // ---- mail ----

  async function mail(to: { email: string }[], subject: string, text: string) {
    for (const r of to) {
      try {
        await deps.mailer.send({ to: r.email, subject, text });
      } catch (err) {
        // The review step is already saved; a mail server hiccup must not undo it. The log says who missed a mail.
        deps.logger.error({ err, to: r.email, subject }, 'finding mail not sent');
      }
    }
  }

  /** The author and everyone who edited or spoke in the thread, except `exceptId`. */
  function participants(row: repo.FindingRow, exceptId: number) {
    const ids = new Set([row.createdBy, ...repo.editorIds(db, row.id), ...repo.listThread(db, row.id).map((c) => c.createdBy)]);
    ids.delete(exceptId);
    return repo.emailsOf(db, [...ids]);
  }

  const addThread = repo.insertThreadEntry;

  // ---- content ----

  function list(query: FindingListQuery, user: User): FindingList {
    const { rows, total } = repo.listFindings(db, query, user.id);
    const names = repo.userNames(
      db,
      rows.map((r) => r.createdBy),
    );
    return {
      items: rows.map((r) => ({
        id: r.id,
        seriesId: r.seriesId,
        version: r.version,
        state: r.state,
        title: r.title,
        author: person(r.createdBy, names),
        savedAt: r.savedAt,
        createdAt: r.createdAt,
        wikiSlug: repo.findPageOfFinding(db, r.id)?.slug ?? null,
        species: repo.speciesNames(db, r.speciesIds),
        resins: repo.resinNames(db, r.resinIds),
      })),
      page: query.page,
      pageSize: query.pageSize,
      total,
    };
  }

  function get(id: number, user: User): Finding {
    return toFinding(load(id), user);
  }

  function create(user: User, input: CreateFindingInput): Finding {
    checkRefs(input);
    const now = iso();
    const id = db.transaction((tx) => {
      const findingId = repo.insertFinding(tx, input, user.id, now);
      writeAudit(tx, { actorId: user.id, action: 'finding-created', entity: 'finding', entityId: findingId, after: { title: input.title } });
      return findingId;
    });
    return get(id, user);
  }

  /** Autosave: folds into the writer's latest revision when it is recent and not yet submitted, else appends one. */
  function update(user: User, id: number, input: UpdateFindingInput): Finding {
    const row = load(id);
    enforce(row, user, 'edit');
    checkRefs(input);
    const latest = repo.latestRevision(db, id);
    const current = latest?.revision ?? row.revision;
    if (input.baseRevision !== current) {
      throw new Conflict(`Someone saved this finding since you opened it (revision ${current}); reload to see their changes`, {
        baseRevision: [`The finding is at revision ${current}`],
      });
    }
    const now = iso();
    const next = {
      title: input.title ?? row.title,
      bodyMd: input.bodyMd ?? row.bodyMd,
      trialIds: input.trialIds ?? row.trialIds,
      speciesIds: input.speciesIds ?? row.speciesIds,
      resinIds: input.resinIds ?? row.resinIds,
    };
    const unchanged =
      JSON.stringify(next) ===
      JSON.stringify({ title: row.title, bodyMd: row.bodyMd, trialIds: row.trialIds, speciesIds: row.speciesIds, resinIds: row.resinIds });
    if (unchanged) return toFinding(row, user);
    const fold =
      latest !== undefined &&
      latest.createdBy === user.id &&
      new Date(now).getTime() - new Date(latest.savedAt).getTime() < FOLD_MINUTES * 60_000 &&
      (row.submittedAt === null || latest.savedAt > row.submittedAt);
    db.transaction((tx) => {
      let revision = current;
      if (fold && latest) {
        tx.update(findingRevisions)
          .set({ ...next, savedAt: now })
          .where(eq(findingRevisions.id, latest.id))
          .run();
      } else {
        revision = current + 1;
        tx.insert(findingRevisions)
          .values({ findingId: id, revision, ...next, savedAt: now, createdBy: user.id })
          .run();
      }
      tx.update(findings)
        .set({ ...next, revision, savedAt: now })
        .where(eq(findings.id, id))
        .run();
    });
    return get(id, user);
  }

  function revisions(id: number): { items: RevisionSummary[] } {
    load(id);
    const rows = repo.listRevisions(db, id);
    const names = repo.userNames(
      db,
      rows.map((r) => r.createdBy),
    );
    return { items: rows.map((r) => ({ revision: r.revision, editor: person(r.createdBy, names), savedAt: r.savedAt, title: r.title })) };
  }

  function revision(id: number, n: number): { revision: Revision } {
    load(id);
    const r = repo.findRevision(db, id, n);
    if (!r) throw new NotFound('Revision');
    const names = repo.userNames(db, [r.createdBy]);
    return {
      revision: {
        revision: r.revision,
        editor: person(r.createdBy, names),
        savedAt: r.savedAt,
        title: r.title,
        bodyMd: r.bodyMd,
        bodyHtml: renderMarkdown(r.bodyMd),
        trialIds: r.trialIds,
        speciesIds: r.speciesIds,
        resinIds: r.resinIds,
      },
    };
  }

  // ---- evidence ----

  function attachable(): { items: AttachableView[] } {
    const rows = repo.listSavedViews(db);
    const names = repo.userNames(
      db,
      rows.flatMap((r) => (r.created_by === null ? [] : [r.created_by])),
    );
    return {
      items: rows.map((r) => ({
        id: r.id,
        title: r.title,
        kind: 'saved-view',
        createdAt: r.created_at,
        createdBy: r.created_by === null ? { id: 0, name: 'Lumenbook' } : person(r.created_by, names),
      })),
    };
  }

  /** Copies the saved view's snapshot into the finding and draws its plot; the copy never follows the saved view again. */
  function attach(user: User, id: number, savedViewId: number): Finding {
    const row = load(id);
    enforce(row, user, 'attach');
    const view = repo.readSavedView(db, savedViewId);
    if (!view) throw new ValidationFailed('That saved view does not exist', { savedViewId: ['No saved view with this id'] });
    const svg = plotSvgFromSnapshot(view.snapshot);
    db.transaction((tx) => {
      const position = repo.insertEvidenceCopy(tx, id, view, svg, user.id, iso());
      writeAudit(tx, { actorId: user.id, action: 'evidence-attached', entity: 'finding', entityId: id, after: { savedViewId, position } });
    });
    return get(id, user);
  }

  function detach(user: User, id: number, evidenceId: number): Finding {
    const row = load(id);
    enforce(row, user, 'attach');
    const ev = repo.listEvidence(db, id).find((e) => e.id === evidenceId);
    if (!ev) throw new NotFound('Evidence');
    db.transaction((tx) => {
      tx.delete(findingEvidence).where(eq(findingEvidence.id, evidenceId)).run();
      writeAudit(tx, {
        actorId: user.id,
        action: 'evidence-detached',
        entity: 'finding',
        entityId: id,
        before: { savedViewId: ev.savedViewId, title: ev.title },
      });
    });
    return get(id, user);
  }

  // ---- review ----

  async function submit(user: User, id: number): Promise<Finding> {
    const row = load(id);
    const next = enforce(row, user, 'submit');
    if (!row.title.trim() || !row.bodyMd.trim())
      throw new ValidationFailed('Write a title and a body before submitting', { bodyMd: ['Write what the trial showed'] });
    const now = iso();
    db.transaction((tx) => {
      repo.markSubmitted(tx, id, next, user.id, now);
      writeAudit(tx, { actorId: user.id, action: 'finding-submitted', entity: 'finding', entityId: id });
    });
    const cannot = new Set([row.createdBy, ...repo.editorIds(db, id)]);
    const to = repo.reviewers(db).filter((r) => !cannot.has(r.id));
    await mail(
      to,
      `Review requested: ${row.title}`,
      `${user.name} asks for a review of the finding "${row.title}" (version ${row.version}).\n\nRead it, comment, return or approve it here:\n${link(`/findings/${id}`)}\n`,
    );
    return get(id, user);
  }

  async function comment(user: User, id: number, bodyMd: string): Promise<Finding> {
    const row = load(id);
    enforce(row, user, 'comment');
    db.transaction((tx) => addThread(tx, id, 'comment', bodyMd, user.id));
    const excerpt = markdownToText(bodyMd).slice(0, 500);
    await mail(
      participants(row, user.id),
      `New comment on: ${row.title}`,
      `${user.name} commented on the finding "${row.title}":\n\n${excerpt}\n\nReply or read the thread here:\n${link(`/findings/${id}`)}\n`,
    );
    return get(id, user);
  }

  async function returnFinding(user: User, id: number, reason: string): Promise<Finding> {
    const row = load(id);
    const next = enforce(row, user, 'return');
    db.transaction((tx) => {
      tx.update(findings).set({ state: next }).where(eq(findings.id, id)).run();
      addThread(tx, id, 'returned', reason, user.id);
      writeAudit(tx, { actorId: user.id, action: 'finding-returned', entity: 'finding', entityId: id, reason });
    });
    const to = repo.emailsOf(
      db,
      [...new Set([row.createdBy, ...repo.editorIds(db, id)])].filter((i) => i !== user.id),
    );
    await mail(
      to,
      `Returned for changes: ${row.title}`,
      `${user.name} returned the finding "${row.title}" with this reason:\n\n${markdownToText(reason).slice(0, 1000)}\n\nReopen it, revise and submit again here:\n${link(`/findings/${id}`)}\n`,
    );
    return get(id, user);
  }

  function reopen(user: User, id: number): Finding {
    const row = load(id);
    const next = enforce(row, user, 'reopen');
    db.transaction((tx) => {
      tx.update(findings).set({ state: next }).where(eq(findings.id, id)).run();
      addThread(tx, id, 'reopened', 'Reopened for changes.', user.id);
      writeAudit(tx, { actorId: user.id, action: 'finding-reopened', entity: 'finding', entityId: id });
    });
    return get(id, user);
  }

  function withdraw(user: User, id: number): Finding {
    const row = load(id);
    const next = enforce(row, user, 'withdraw');
    db.transaction((tx) => {
      tx.update(findings).set({ state: next }).where(eq(findings.id, id)).run();
      addThread(tx, id, 'withdrawn', 'Withdrawn.', user.id);
      writeAudit(tx, { actorId: user.id, action: 'finding-withdrawn', entity: 'finding', entityId: id });
    });
    return get(id, user);
  }

  /** A new version of an approved finding: a draft with the same content and evidence copies, reviewed afresh. */
  function revise(user: User, id: number): Finding {
    const row = load(id);
    enforce(row, user, 'revise');
    const now = iso();
    const newId = db.transaction((tx) => {
      const created = tx
        .insert(findings)
        .values({
          seriesId: row.seriesId,
          version: row.version + 1,
          supersedesId: row.id,
          title: row.title,
          bodyMd: row.bodyMd,
          trialIds: row.trialIds,
          speciesIds: row.speciesIds,
          resinIds: row.resinIds,
          savedAt: now,
          createdBy: user.id,
        })
        .returning({ id: findings.id })
        .get();
      tx.insert(findingRevisions)
        .values({
          findingId: created.id,
          revision: 1,
          title: row.title,
          bodyMd: row.bodyMd,
          trialIds: row.trialIds,
          speciesIds: row.speciesIds,
          resinIds: row.resinIds,
          savedAt: now,
          createdBy: user.id,
        })
        .run();
      for (const e of repo.listEvidence(tx, row.id)) {
        tx.insert(findingEvidence)
          .values({
            findingId: created.id,
            position: e.position,
            savedViewId: e.savedViewId,
            title: e.title,
            kind: e.kind,
            snapshot: e.snapshot,
            svg: e.svg,
            createdBy: user.id,
          })
          .run();
      }
      writeAudit(tx, {
        actorId: user.id,
        action: 'finding-revised',
        entity: 'finding',
        entityId: created.id,
        after: { supersedes: row.id, version: row.version + 1 },
      });
      return created.id;
    });
    return get(newId, user);
  }

  function contentFromFinding(
    row: repo.FindingRow,
    sig: { signerId: number; signerName: string; meaning: repo.SignatureRow['meaning']; signedAt: string },
  ): SignedContent {
    return {
      finding: {
        id: row.id,
        seriesId: row.seriesId,
        version: row.version,
        authorId: row.createdBy,
        title: row.title,
        bodyMd: row.bodyMd,
        trialIds: row.trialIds,
        speciesIds: row.speciesIds,
        resinIds: row.resinIds,
      },
      evidence: repo
        .listEvidence(db, row.id)
        .map((e) => ({ position: e.position, savedViewId: e.savedViewId, title: e.title, kind: e.kind, snapshot: e.snapshot, svg: e.svg })),
      signature: sig,
    };
  }

  function contentFromPage(page: repo.PageRow, sig: repo.SignatureRow): SignedContent {
    const tags = repo.pageTags(db, page.id);
    return {
      finding: {
        id: page.findingId,
        seriesId: page.seriesId,
        version: page.version,
        authorId: page.authorId,
        title: page.title,
        bodyMd: page.bodyMd,
        trialIds: page.trials.map((t) => t.id),
        speciesIds: tags.filter((t) => t.kind === 'species').map((t) => t.refId),
        resinIds: tags.filter((t) => t.kind === 'resin').map((t) => t.refId),
      },
      evidence: repo
        .listEvidence(db, page.findingId)
        .map((e) => ({ position: e.position, savedViewId: e.savedViewId, title: e.title, kind: e.kind, snapshot: e.snapshot, svg: e.svg })),
      signature: { signerId: sig.signerId, signerName: sig.signerName, meaning: sig.meaning, signedAt: sig.signedAt },
    };
  }

  function uniqueSlug(tx: Db, row: repo.FindingRow): string {
    const base = `${slugify(row.title)}-${row.seriesId}${row.version > 1 ? `-v${row.version}` : ''}`;
    let slug = base;
    for (let i = 2; repo.slugTaken(tx, slug); i++) slug = `${base}-${i}`;
    return slug;
  }

  /**
   * Approval is an electronic signature: the password again, a meaning, the name as printed now, the
   * time, and a SHA-256 over the canonical content and evidence. The finding, the signature and the
   * wiki page (with its search row) are written in one transaction; the previous page of the series is
   * marked superseded. A wrong password signs nothing and is written to the audit log.
   */
  async function approve(user: User, id: number, input: ApproveFindingInput): Promise<Finding> {
    const row = load(id);
    const next = enforce(row, user, 'approve');
    // Failed signing attempts are counted in SQLite per signer, like failed sign-ins: they survive a restart.
    const since = new Date(deps.now().getTime() - signingLimit.windowMs).toISOString();
    if (repo.countRefusedSignatures(db, user.id, since) >= signingLimit.limit) {
      throw new AppError('rate_limited', 'Too many failed signing attempts; wait a few minutes and try again');
    }
    const account = repo.findUser(db, user.id);
    const ok = account?.passwordHash ? await bcrypt.compare(input.password, account.passwordHash) : false;
    if (!ok) {
      db.transaction((tx) => repo.recordRefusedSignature(tx, user.id, id, iso()));
      throw new AppError('forbidden', 'The password is not right; nothing was signed', { password: ['The password is not right'] });
    }
    const signedAt = iso();
    const sigFields = { signerId: user.id, signerName: account!.name, meaning: input.meaning, signedAt };
    const page = db.transaction((tx) => {
      // Re-read inside the transaction: nothing may change between what is hashed and what is stored.
      const fresh = repo.findFinding(tx, id)!;
      if (fresh.state !== 'in-review' || fresh.savedAt !== row.savedAt)
        throw new Conflict('The finding changed while you were signing; read it again and sign again');
      const content = contentFromFinding(fresh, sigFields);
      const { canonical, hash } = hashContent(content);
      const sig = tx
        .insert(signatures)
        .values({
          findingId: id,
          ...sigFields,
          algorithm: SIGNATURE_ALGORITHM,
          canonicalForm: CANONICAL_FORM,
          contentHash: hash,
          signedContent: canonical,
          createdBy: user.id,
        })
        .returning()
        .get();
      tx.update(findings).set({ state: next, approvedAt: signedAt }).where(eq(findings.id, id)).run();
      addThread(tx, id, 'approved', `Signed: ${SIGNATURE_MEANING_LABELS[input.meaning]}.`, user.id);
      const author = repo.findUser(tx, fresh.createdBy);
      const trials = repo.trialTitles(tx, fresh.trialIds);
      const created = tx
        .insert(wikiPages)
        .values({
          slug: uniqueSlug(tx, fresh),
          findingId: id,
          seriesId: fresh.seriesId,
          version: fresh.version,
          title: fresh.title,
          bodyMd: fresh.bodyMd,
          bodyHtml: renderMarkdown(fresh.bodyMd),
          authorId: fresh.createdBy,
          authorName: author?.name ?? `user ${fresh.createdBy}`,
          trials: fresh.trialIds.map((tid) => trials.find((t) => t.id === tid)).filter((t): t is NonNullable<typeof t> => t !== undefined),
          signatureId: sig.id,
          approvedAt: signedAt,
          createdBy: user.id,
        })
        .returning()
        .get();
      const sp = repo.speciesNames(tx, fresh.speciesIds);
      const rs = repo.resinNames(tx, fresh.resinIds);
      for (const sid of fresh.speciesIds)
        tx.insert(wikiPageTags)
          .values({ pageId: created.id, kind: 'species', refId: sid, name: sp.find((s) => s.id === sid)?.name ?? '' })
          .run();
      for (const rid of fresh.resinIds)
        tx.insert(wikiPageTags)
          .values({ pageId: created.id, kind: 'resin', refId: rid, name: rs.find((r) => r.id === rid)?.name ?? '' })
          .run();
      tx.run(
        sql`insert into wiki_fts (rowid, title, body, tags) values (${created.id}, ${fresh.title}, ${markdownToText(fresh.bodyMd)}, ${[...sp.map((s) => s.name), ...rs.map((r) => r.name)].join(' ')})`,
      );
      const older = repo.currentPageOfSeries(tx, fresh.seriesId, created.id);
      if (older) tx.update(wikiPages).set({ supersededById: created.id }).where(eq(wikiPages.id, older.id)).run();
      writeAudit(tx, {
        actorId: user.id,
        action: 'finding-approved',
        entity: 'finding',
        entityId: id,
        after: { signatureId: sig.id, hash, meaning: input.meaning, page: created.slug },
      });
      return created;
    });
    await mail(
      repo.emailsOf(
        db,
        [...new Set([row.createdBy, ...repo.editorIds(db, id)])].filter((i) => i !== user.id),
      ),
      `Approved: ${row.title}`,
      `${account!.name} approved the finding "${row.title}" (${SIGNATURE_MEANING_LABELS[input.meaning]}).\n\nIt is now a page of the shop wiki:\n${link(`/wiki/${page.slug}`)}\n`,
    );
    return get(id, user);
  }

  /** Recomputes the hash from the finding's rows and from its wiki page's rows, and says what differs from what was signed. */
  function verify(id: number): Verification {
    const row = load(id);
    const sig = repo.findSignature(db, id);
    if (!sig) throw new NotFound('Signature');
    const sigFields = { signerId: sig.signerId, signerName: sig.signerName, meaning: sig.meaning, signedAt: sig.signedAt };
    const fromFinding = contentFromFinding(row, sigFields);
    const findingHash = hashContent(fromFinding).hash;
    const page = repo.findPageOfFinding(db, id);
    const fromPage = page ? contentFromPage(page, sig) : null;
    const pageHash = fromPage ? hashContent(fromPage).hash : null;
    const differences: string[] = [];
    if (sha256Hex(sig.signedContent) !== sig.contentHash) differences.push('signature record: the stored signed content no longer matches its hash');
    if (findingHash !== sig.contentHash) differences.push(...whatDiffers(sig.signedContent, fromFinding, 'finding'));
    if (fromPage && pageHash !== sig.contentHash) differences.push(...whatDiffers(sig.signedContent, fromPage, 'wiki page'));
    // The page's HTML is not signed (it is derived), but it must still be what its signed Markdown renders to.
    if (page && page.bodyHtml !== renderMarkdown(page.bodyMd)) differences.push('wiki page: bodyHtml no longer matches the signed Markdown');
    const intact = findingHash === sig.contentHash && (pageHash === null || pageHash === sig.contentHash) && differences.length === 0;
    if (!intact && differences.length === 0) differences.push('signature record: the signed hash was changed');
    return { status: intact ? 'intact' : 'altered', checkedAt: iso(), signedHash: sig.contentHash, findingHash, pageHash, differences };
  }

  return {
    list,
    get,
    create,
    update,
    revisions,
    revision,
    attachable,
    attach,
    detach,
    submit,
    comment,
    returnFinding,
    reopen,
    withdraw,
    revise,
    approve,
    verify,
  };
}
