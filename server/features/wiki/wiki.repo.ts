import { and, asc, count, desc, eq, inArray, isNull, sql, type SQL } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { users } from '../../db/schema/auth';
import { findingEvidence, signatures } from '../../db/schema/findings';
import { wikiPages, wikiPageTags } from '../../db/schema/wiki';

export type PageRow = typeof wikiPages.$inferSelect;
export type TagRow = typeof wikiPageTags.$inferSelect;

export function findPageBySlug(db: Db, slug: string): PageRow | undefined {
  return db.select().from(wikiPages).where(eq(wikiPages.slug, slug)).get();
}
export function findPage(db: Db, id: number): PageRow | undefined {
  return db.select().from(wikiPages).where(eq(wikiPages.id, id)).get();
}
/** The page this one replaced: the page of the same series whose successor is this page. */
export function pageSupersededBy(db: Db, id: number): PageRow | undefined {
  return db.select().from(wikiPages).where(eq(wikiPages.supersededById, id)).get();
}

export function tagsOf(db: Db, pageIds: number[]): TagRow[] {
  if (pageIds.length === 0) return [];
  return db.select().from(wikiPageTags).where(inArray(wikiPageTags.pageId, pageIds)).orderBy(asc(wikiPageTags.id)).all();
}

/** Evidence of the page's finding (the findings feature's frozen copies), read through our own query. */
export function evidenceOf(db: Db, findingId: number) {
  return db
    .select()
    .from(findingEvidence)
    .where(eq(findingEvidence.findingId, findingId))
    .orderBy(asc(findingEvidence.position), asc(findingEvidence.id))
    .all();
}
export function signatureOf(db: Db, id: number) {
  return db.select().from(signatures).where(eq(signatures.id, id)).get();
}
export function userNames(db: Db, ids: number[]): Map<number, string> {
  if (ids.length === 0) return new Map();
  return new Map(
    db
      .select({ id: users.id, name: users.name })
      .from(users)
      .where(inArray(users.id, ids))
      .all()
      .map((u) => [u.id, u.name]),
  );
}

interface ListFilters {
  speciesId?: number;
  resinId?: number;
  includeSuperseded: boolean;
  /** An FTS5 MATCH expression, already built from the user's words. */
  match?: string;
  page: number;
  pageSize: number;
}

const tagged = (kind: 'species' | 'resin', refId: number) =>
  sql`exists (select 1 from wiki_page_tags t where t.page_id = "wiki_pages"."id" and t.kind = ${kind} and t.ref_id = ${refId})`;

/** Pages, newest first, or by FTS5 relevance (bm25) when searching, with a snippet of the body. */
export function listPages(db: Db, f: ListFilters) {
  const where: (SQL | undefined)[] = [
    f.includeSuperseded ? undefined : isNull(wikiPages.supersededById),
    f.speciesId ? tagged('species', f.speciesId) : undefined,
    f.resinId ? tagged('resin', f.resinId) : undefined,
  ];
  if (f.match !== undefined) {
    const cond = and(...where, sql`wiki_fts match ${f.match}`);
    const rows = db
      .select({
        page: wikiPages,
        // \u0002 and \u0003 mark the matched words; they cannot occur in text typed into a form field.
        snippet: sql<string>`snippet(wiki_fts, 1, char(2), char(3), '…', 16)`,
      })
      .from(wikiPages)
      .innerJoin(sql`wiki_fts`, sql`wiki_fts.rowid = "wiki_pages"."id"`)
      .where(cond)
      .orderBy(sql`bm25(wiki_fts, 10.0, 1.0, 5.0)`, desc(wikiPages.id))
      .limit(f.pageSize)
      .offset((f.page - 1) * f.pageSize)
      .all();
    const total =
      db
        .select({ n: count() })
        .from(wikiPages)
        .innerJoin(sql`wiki_fts`, sql`wiki_fts.rowid = "wiki_pages"."id"`)
        .where(cond)
        .get()?.n ?? 0;
    return { rows, total };
  }
  const cond = and(...where);
  const rows = db
    .select({ page: wikiPages, snippet: sql<string | null>`null` })
    .from(wikiPages)
    .where(cond)
    .orderBy(desc(wikiPages.approvedAt), desc(wikiPages.id))
    .limit(f.pageSize)
    .offset((f.page - 1) * f.pageSize)
    .all();
  const total = db.select({ n: count() }).from(wikiPages).where(cond).get()?.n ?? 0;
  return { rows, total };
}

/** Every current page with its tags, for the index by species and by resin. */
export function currentPagesWithTags(db: Db) {
  const pages = db
    .select({ id: wikiPages.id, slug: wikiPages.slug, title: wikiPages.title })
    .from(wikiPages)
    .where(isNull(wikiPages.supersededById))
    .orderBy(asc(wikiPages.title))
    .all();
  return {
    pages,
    tags: tagsOf(
      db,
      pages.map((p) => p.id),
    ),
  };
}
