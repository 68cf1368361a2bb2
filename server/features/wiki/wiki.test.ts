import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { Parser } from 'tar';
import { startHarness, type Harness } from '../../testing/harness';
import { resins, species } from '../../db/schema/reference';
import { DEMO_PASSWORD } from '../../seed';
import { ftsQuery, snippetPieces } from './wiki.service';

type Agent = Awaited<ReturnType<Harness['signIn']>>;
let h: Harness;
let tech: Agent;
let reviewer: Agent;
let viewer: Agent;

const speciesId = (name: string) => h.database.db.select().from(species).where(eq(species.commonName, name)).get()!.id;
const resinRow = () => h.database.db.select().from(resins).get()!;

const XSS = '<img src=x onerror="alert(1)"><script>alert(2)</script>';

/** Every real tag in the HTML is a harmless one, with no handler and no script URL. */
function expectInert(html: string) {
  for (const tag of html.match(/<[a-z][^>]*>/gi) ?? []) {
    expect(tag).toMatch(/^<(p|a|em|strong|code)[\s>]/);
    expect(tag).not.toMatch(/\son\w+=|javascript:/i);
  }
}

/** Drafts, submits and approves a finding; answers its wiki slug. */
async function publish(body: Record<string, unknown>): Promise<string> {
  const created = await tech.post('/api/findings').send(body);
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  const id = created.body.finding.id as number;
  expect((await tech.post(`/api/findings/${id}/submit`)).status).toBe(200);
  const ok = await reviewer.post(`/api/findings/${id}/approve`).send({ password: DEMO_PASSWORD, meaning: 'approved-for-wiki' });
  expect(ok.status, JSON.stringify(ok.body)).toBe(200);
  return ok.body.finding.wikiSlug as string;
}

let mapleSlug: string;
let xssSlug: string;
let xssSpeciesId: number;

beforeAll(async () => {
  h = await startHarness();
  tech = await h.signIn('tech@demo.test');
  reviewer = await h.signIn('reviewer@demo.test');
  viewer = await h.signIn('viewer@demo.test');
  // A species whose name is a script: names reach the page as text only.
  xssSpeciesId = h.database.db
    .insert(species)
    .values({ commonName: `Test wood ${XSS}`, botanicalName: 'Testus scriptus', source: 'invented for a test', origin: 'shop-measured' })
    .returning()
    .get().id;
  mapleSlug = await publish({
    title: 'Overnight soak fills spalted maple',
    bodyMd: 'The coupons soaked overnight reached a **thorough** fill; the four-hour soak left dry cores.',
    speciesIds: [speciesId('Maple, red')],
    resinIds: [resinRow().id],
  });
  xssSlug = await publish({
    title: `Title ${XSS}`,
    bodyMd: `Body ${XSS}\n\n[link](javascript:alert(3)) and [good](https://example.org)`,
    speciesIds: [xssSpeciesId],
  });
});
afterAll(async () => {
  await h.close();
});

describe('wiki', () => {
  it('lets every signed-in role read the index and the pages', async () => {
    expect((await h.agent().get('/api/wiki')).status).toBe(401);
    const list = await viewer.get('/api/wiki');
    expect(list.status).toBe(200);
    expect(list.body.items.map((i: { slug: string }) => i.slug)).toEqual(expect.arrayContaining([mapleSlug, xssSlug]));
    const page = await viewer.get(`/api/wiki/${mapleSlug}`);
    expect(page.body.page).toMatchObject({ title: 'Overnight soak fills spalted maple', version: 1, supersededBy: null });
    expect(page.body.page.signature).toMatchObject({ signerName: 'Ilse Marrow (quality)', meaningLabel: 'Approved for the shop wiki' });
    expect(page.body.page.bodyHtml).toContain('<strong>thorough</strong>');
    expect((await viewer.get('/api/wiki/no-such-page-1')).status).toBe(404);
    expect((await viewer.get('/api/wiki/Bad Slug')).status).toBe(400);
  });

  it('groups current pages by species and by resin', async () => {
    const idx = (await viewer.get('/api/wiki/index')).body;
    const maple = idx.bySpecies.find((g: { species: { name: string } }) => g.species.name === 'Maple, red');
    expect(maple.pages.map((p: { slug: string }) => p.slug)).toEqual([mapleSlug]);
    const resin = idx.byResin.find((g: { resin: { id: number } }) => g.resin.id === resinRow().id);
    expect(resin.pages.map((p: { slug: string }) => p.slug)).toContain(mapleSlug);
    const bySpecies = await viewer.get(`/api/wiki?speciesId=${speciesId('Maple, red')}`);
    expect(bySpecies.body.items.map((i: { slug: string }) => i.slug)).toEqual([mapleSlug]);
  });

  it('finds a page by a word of its body (stemmed) and by a species name, with a marked snippet', async () => {
    const byBody = await viewer.get('/api/wiki?q=cores');
    expect(byBody.body.items.map((i: { slug: string }) => i.slug)).toEqual([mapleSlug]);
    const snippet = byBody.body.items[0].snippet as { text: string; match: boolean }[];
    expect(snippet.filter((p) => p.match).map((p) => p.text.toLowerCase())).toEqual(['cores']);
    // "soaking" finds "soaked"/"soak" through the Porter stemmer.
    expect((await viewer.get('/api/wiki?q=soaking')).body.items.map((i: { slug: string }) => i.slug)).toContain(mapleSlug);
    const bySpecies = await viewer.get('/api/wiki?q=maple red');
    expect(bySpecies.body.items.map((i: { slug: string }) => i.slug)).toEqual([mapleSlug]);
    expect((await viewer.get('/api/wiki?q=walnut')).body.items).toEqual([]);
    // FTS5 syntax typed by a user is only text, never an error.
    expect((await viewer.get('/api/wiki?q=' + encodeURIComponent('"maple" OR NEAR( -*'))).status).toBe(200);
  });

  it('keeps XSS payloads in title, body, comments and tags inert in the API answers', async () => {
    const page = (await viewer.get(`/api/wiki/${xssSlug}`)).body.page;
    // Title and tag names are text (the client prints them as text); the HTML has no live markup.
    expect(page.title).toBe(`Title ${XSS}`);
    expect(page.species[0].name).toBe(`Test wood ${XSS}`);
    expectInert(page.bodyHtml);
    expect(page.bodyHtml).toContain('&lt;img src=x onerror="alert(1)"&gt;');
    expect(page.bodyHtml).toContain('<a href="https://example.org" rel="noopener noreferrer">good</a>');
    // Comments go through the same renderer.
    const f = await tech.post('/api/findings').send({ title: 'Comment test', bodyMd: 'x' });
    const c = await tech.post(`/api/findings/${f.body.finding.id}/comments`).send({ bodyMd: `Note ${XSS} [x](javascript:alert(4))` });
    const entry = c.body.finding.thread.at(-1);
    expectInert(entry.bodyHtml);
    expect(entry.bodyHtml).not.toContain('<a ');
  });

  it('exports a page as one .tar.gz with the Markdown, front matter and signature', async () => {
    const res = await viewer
      .get(`/api/wiki/${mapleSlug}/export`)
      .buffer(true)
      .parse((r, cb) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => cb(null, Buffer.concat(chunks)));
      });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/gzip');
    expect(res.headers['content-disposition']).toBe(`attachment; filename="${mapleSlug}.tar.gz"`);
    const files = await untar(res.body as Buffer);
    expect([...files.keys()]).toContain(`${mapleSlug}/${mapleSlug}.md`);
    const md = files.get(`${mapleSlug}/${mapleSlug}.md`)!;
    expect(md).toMatch(/^---\ntitle: "Overnight soak fills spalted maple"\n/);
    expect(md).toContain('signer: "Ilse Marrow (quality)"');
    expect(md).toMatch(/sha256: [0-9a-f]{64}/);
    expect(md).toContain('The coupons soaked overnight reached a **thorough** fill');
  });
});

/** Reads a .tar.gz into a map of path → text with node-tar's parser. */
async function untar(data: Buffer): Promise<Map<string, string>> {
  const files = new Map<string, string>();
  const parser = new Parser({
    onReadEntry: (entry) => {
      const chunks: Buffer[] = [];
      entry.on('data', (c: Buffer) => chunks.push(c));
      entry.on('end', () => files.set(entry.path.replace(/\/$/, ''), Buffer.concat(chunks).toString('utf8')));
    },
  });
  await new Promise<void>((resolve, reject) => {
    parser.on('end', () => resolve());
    parser.on('error', reject);
    parser.end(data);
  });
  return files;
}

describe('search helpers', () => {
  it('quotes every word and prefix-matches it', () => {
    expect(ftsQuery('spalted maple')).toBe('"spalted"* "maple"*');
    expect(ftsQuery('"a" OR b*')).toBe('"a"* "OR"* "b"*');
    expect(ftsQuery('  -- ')).toBeNull();
  });
  it('splits a marked snippet into pieces', () => {
    expect(snippetPieces('a \u0002b\u0003 c')).toEqual([
      { text: 'a ', match: false },
      { text: 'b', match: true },
      { text: ' c', match: false },
    ]);
    expect(snippetPieces(null)).toBeNull();
  });
});
