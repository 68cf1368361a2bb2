import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { create as createTar } from 'tar';
import type { FeatureDeps } from '../../deps';
import { NotFound } from '../../http/errors';
import { CANONICAL_FORM, SIGNATURE_ALGORITHM, SIGNATURE_MEANING_LABELS } from '../../../shared/constants/findings';
import type { Evidence } from '../../../shared/schemas/findings';
import type { WikiIndex, WikiList, WikiPage, WikiQuery } from '../../../shared/schemas/wiki';
import * as repo from './wiki.repo';

/**
 * The user's words as an FTS5 query: each word quoted (so FTS5 syntax typed by a user is only text)
 * and prefix-matched, all of them required. Returns null when nothing searchable is left.
 */
export function ftsQuery(q: string): string | null {
  const words = q.normalize('NFC').match(/[\p{L}\p{N}]+/gu) ?? [];
  if (words.length === 0) return null;
  return words
    .slice(0, 12)
    .map((w) => `"${w}"*`)
    .join(' ');
}

/** FTS5 snippet text with \u0002…\u0003 marks → pieces the client marks up itself. */
export function snippetPieces(s: string | null): { text: string; match: boolean }[] | null {
  if (s === null) return null;
  const pieces: { text: string; match: boolean }[] = [];
  for (const part of s.split('\u0002')) {
    const [hit, rest] = part.includes('\u0003') ? part.split('\u0003', 2) : [null, part];
    if (hit) pieces.push({ text: hit, match: true });
    if (rest) pieces.push({ text: rest, match: false });
  }
  return pieces;
}

const fileSafe = (s: string) =>
  s
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 50) || 'evidence';

const yamlString = (s: string) => JSON.stringify(s);

export function createWikiService(deps: FeatureDeps) {
  const { db } = deps.database;

  function load(slug: string): repo.PageRow {
    const page = repo.findPageBySlug(db, slug);
    if (!page) throw new NotFound('Wiki page');
    return page;
  }

  function list(q: WikiQuery): WikiList {
    const match = q.q ? ftsQuery(q.q) : null;
    if (q.q && match === null) return { items: [], page: q.page, pageSize: q.pageSize, total: 0 };
    const { rows, total } = repo.listPages(db, {
      speciesId: q.speciesId,
      resinId: q.resinId,
      includeSuperseded: q.includeSuperseded === 'true',
      match: match ?? undefined,
      page: q.page,
      pageSize: q.pageSize,
    });
    const tags = repo.tagsOf(
      db,
      rows.map((r) => r.page.id),
    );
    return {
      items: rows.map(({ page, snippet }) => {
        const mine = tags.filter((t) => t.pageId === page.id);
        const sig = repo.signatureOf(db, page.signatureId);
        return {
          slug: page.slug,
          title: page.title,
          version: page.version,
          species: mine.filter((t) => t.kind === 'species').map((t) => ({ id: t.refId, name: t.name })),
          resins: mine.filter((t) => t.kind === 'resin').map((t) => ({ id: t.refId, name: t.name })),
          approvedAt: page.approvedAt,
          signerName: sig?.signerName ?? '',
          superseded: page.supersededById !== null,
          snippet: snippetPieces(snippet),
        };
      }),
      page: q.page,
      pageSize: q.pageSize,
      total,
    };
  }

  function index(): WikiIndex {
    const { pages, tags } = repo.currentPagesWithTags(db);
    const group = (kind: 'species' | 'resin') => {
      const byRef = new Map<number, { name: string; pages: { slug: string; title: string }[] }>();
      for (const t of tags.filter((x) => x.kind === kind)) {
        const p = pages.find((x) => x.id === t.pageId);
        if (!p) continue;
        const g = byRef.get(t.refId) ?? { name: t.name, pages: [] };
        g.pages.push({ slug: p.slug, title: p.title });
        byRef.set(t.refId, g);
      }
      return [...byRef.entries()].sort((a, b) => a[1].name.localeCompare(b[1].name)).map(([id, g]) => ({ ref: { id, name: g.name }, pages: g.pages }));
    };
    return {
      bySpecies: group('species').map((g) => ({ species: g.ref, pages: g.pages })),
      byResin: group('resin').map((g) => ({ resin: g.ref, pages: g.pages })),
    };
  }

  function get(slug: string): WikiPage {
    const page = load(slug);
    const tags = repo.tagsOf(db, [page.id]);
    const evidence = repo.evidenceOf(db, page.findingId);
    const sig = repo.signatureOf(db, page.signatureId);
    if (!sig) throw new NotFound('Signature');
    const names = repo.userNames(db, [sig.signerId, ...evidence.map((e) => e.createdBy)]);
    const next = page.supersededById ? repo.findPage(db, page.supersededById) : undefined;
    const prev = repo.pageSupersededBy(db, page.id);
    return {
      slug: page.slug,
      findingId: page.findingId,
      seriesId: page.seriesId,
      version: page.version,
      title: page.title,
      bodyMd: page.bodyMd,
      bodyHtml: page.bodyHtml,
      species: tags.filter((t) => t.kind === 'species').map((t) => ({ id: t.refId, name: t.name })),
      resins: tags.filter((t) => t.kind === 'resin').map((t) => ({ id: t.refId, name: t.name })),
      trials: page.trials,
      author: { id: page.authorId, name: page.authorName },
      evidence: evidence.map((e): Evidence => ({
        id: e.id,
        position: e.position,
        savedViewId: e.savedViewId,
        title: e.title,
        kind: e.kind,
        snapshot: e.snapshot,
        svg: e.svg,
        attachedAt: e.createdAt,
        attachedBy: { id: e.createdBy, name: names.get(e.createdBy) ?? `user ${e.createdBy}` },
      })),
      signature: {
        id: sig.id,
        signer: { id: sig.signerId, name: names.get(sig.signerId) ?? sig.signerName },
        signerName: sig.signerName,
        meaning: sig.meaning,
        meaningLabel: SIGNATURE_MEANING_LABELS[sig.meaning],
        signedAt: sig.signedAt,
        algorithm: SIGNATURE_ALGORITHM,
        canonicalForm: CANONICAL_FORM,
        contentHash: sig.contentHash,
      },
      approvedAt: page.approvedAt,
      supersededBy: next ? { slug: next.slug, title: next.title, version: next.version } : null,
      supersedes: prev ? { slug: prev.slug, title: prev.title, version: prev.version } : null,
    };
  }

  /**
   * A page for a wiki kept elsewhere, as one .tar.gz holding a folder named after the page:
   * `<slug>.md` with YAML front matter (signature included), each plot as `plots/<n>-<name>.svg` linked
   * from the Markdown, and each evidence snapshot as JSON. Files are written to a temporary folder,
   * archived with node-tar (the package the backups use) and removed.
   */
  async function exportArchive(slug: string): Promise<{ fileName: string; data: Buffer }> {
    const page = get(slug);
    const files = new Map<string, string>();
    const lines = [
      '---',
      `title: ${yamlString(page.title)}`,
      `version: ${page.version}`,
      `author: ${yamlString(page.author.name)}`,
      `approved: ${yamlString(page.approvedAt)}`,
      `species: [${page.species.map((s) => yamlString(s.name)).join(', ')}]`,
      `resins: [${page.resins.map((r) => yamlString(r.name)).join(', ')}]`,
      `trials: [${page.trials.map((t) => yamlString(`${t.code} ${t.title}`)).join(', ')}]`,
      'signature:',
      `  signer: ${yamlString(page.signature.signerName)}`,
      `  meaning: ${yamlString(page.signature.meaningLabel)}`,
      `  signed: ${yamlString(page.signature.signedAt)}`,
      `  sha256: ${page.signature.contentHash}`,
      `  canonical-form: ${page.signature.canonicalForm}`,
      ...(page.supersededBy ? [`superseded-by: ${yamlString(page.supersededBy.slug)}`] : []),
      '---',
      '',
      page.bodyMd.trimEnd(),
      '',
    ];
    if (page.evidence.length > 0) lines.push('## Evidence', '');
    for (const e of page.evidence) {
      const base = `${e.position}-${fileSafe(e.title)}`;
      lines.push(`### ${e.title}`, '');
      if (e.svg) {
        files.set(`plots/${base}.svg`, e.svg);
        lines.push(`![${e.title.replace(/[[\]]/g, '')}](plots/${base}.svg)`, '');
      }
      files.set(`evidence/${base}.json`, JSON.stringify(e.snapshot, null, 2));
      lines.push(`Numbers as frozen when attached: [evidence/${base}.json](evidence/${base}.json)`, '');
    }
    lines.push('---', '', `Signed by ${page.signature.signerName} on ${page.signature.signedAt}: ${page.signature.meaningLabel}.`, '');
    files.set(`${page.slug}.md`, lines.join('\n'));

    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'lumenbook-wiki-export-'));
    try {
      const mtime = new Date(page.approvedAt);
      for (const [name, text] of files) {
        const file = path.join(dir, page.slug, name);
        fs.mkdirSync(path.dirname(file), { recursive: true });
        fs.writeFileSync(file, text, 'utf8');
        fs.utimesSync(file, mtime, mtime);
      }
      const chunks: Buffer[] = [];
      for await (const chunk of createTar({ gzip: true, cwd: dir, portable: true, mtime }, [page.slug])) chunks.push(chunk as Buffer);
      return { fileName: `${page.slug}.tar.gz`, data: Buffer.concat(chunks) };
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  }

  return { list, index, get, exportArchive };
}
