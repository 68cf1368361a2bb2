import { describe, expect, it } from 'vitest';
import { rowModel } from './grid-model';
import { converter, testCoupon } from './grid-test-coupon';
import {
  dropSaved,
  locateError,
  mergeRefusals,
  nothingSavedText,
  planBatch,
  prepareSave,
  refusalsFrom,
  refusedText,
  replaceSaved,
  savedText,
} from './save-plan';

const NOW = '2026-03-01T10:00:00.000Z';
const metric = converter('metric');
const row = (id: number, draft: Record<string, string>) => rowModel(testCoupon({ id, tag: `C-${id}` }), draft, metric, NOW);

describe('planBatch', () => {
  it('sends only savable rows: their weighings and whole size sets, with the cells behind each', () => {
    const rows = [
      row(1, { dry: '20', 'dry-length': '120', 'dry-width': '25', 'dry-thickness': '20', cured: '25' }),
      row(2, {}), // nothing typed
      row(3, { 'dry-length': '120' }), // a size half typed waits
      row(4, { dry: '-1' }), // impossible
      row(5, { soaked: '30' }),
    ];
    const plan = planBatch(rows, NOW);
    expect(plan.entries).toEqual([
      {
        couponId: 1,
        weighings: [
          { stage: 'dry', massG: 20, measuredAt: NOW },
          { stage: 'cured', massG: 25, measuredAt: NOW },
        ],
        checks: [{ kind: 'dimension', stage: 'dry', measuredAt: NOW, lengthMm: 120, widthMm: 25, thicknessMm: 20 }],
      },
      { couponId: 5, weighings: [{ stage: 'soaked', massG: 30, measuredAt: NOW }] },
    ]);
    expect(plan.cells).toEqual([
      { couponId: 1, weighings: ['dry', 'cured'], checks: [['dry-length', 'dry-width', 'dry-thickness']] },
      { couponId: 5, weighings: ['soaked'], checks: [] },
    ]);
  });

  it('converts typed US values to SI before sending', () => {
    const plan = planBatch([rowModel(testCoupon({ id: 7 }), { dry: '1' }, converter('us'), NOW)], NOW);
    expect(plan.entries[0]?.weighings?.[0]?.massG).toBeCloseTo(28.349523125, 9); // 1 oz (NIST SP 811 App. B)
  });
});

describe('locateError', () => {
  const plan = planBatch([row(1, { dry: '20', cured: '25', 'cured-length': '1', 'cured-width': '2', 'cured-thickness': '3' })], NOW);
  it.each([
    ['entries.0.weighings.1.massG', { couponId: 1, cells: ['cured'] }],
    ['entries.0.checks.0.widthMm', { couponId: 1, cells: ['cured-width'] }],
    ['entries.0.checks.0', { couponId: 1, cells: ['cured-length', 'cured-width', 'cured-thickness'] }],
    ['entries.0', { couponId: 1, cells: [] }],
    ['entries.4.weighings.0', null],
    ['entries', null],
  ])('%s lands on %o', (path, where) => {
    expect(locateError(path, plan)).toEqual(where);
  });
});

describe('prepareSave', () => {
  it('holds back rows with problems and rows the contract refuses, and sends the rest', () => {
    const rows = [row(1, { dry: '20' }), row(2, { dry: 'x' }), row(3, { 'dry-length': '3000', 'dry-width': '25', 'dry-thickness': '20' })];
    const prepared = prepareSave(rows, NOW);
    expect(prepared.body?.entries.map((e) => e.couponId)).toEqual([1]);
    expect(prepared.plan.entries.map((e) => e.couponId)).toEqual([1]);
    expect(prepared.held).toBe(2);
    expect(prepared.refused.cells[3]).toEqual({ 'dry-length': 'Above 2000 mm is not a coupon' });
  });

  it('says why nothing went', () => {
    expect(nothingSavedText(prepareSave([row(1, {})], NOW))).toEqual({ text: 'Nothing to save: no new values typed.', bad: false });
    expect(nothingSavedText(prepareSave([row(1, { dry: 'x' }), row(2, { cured: '0' })], NOW))).toEqual({
      text: 'Nothing saved: 2 rows have problems, marked in the Check column.',
      bad: true,
    });
  });

  it('refuses more rows than one request carries as a whole, naming the limit', () => {
    const many = Array.from({ length: 501 }, (_, i) => row(1000 + i, { dry: '20' }));
    const prepared = prepareSave(many, NOW);
    expect(prepared.body).toBeNull();
    expect(nothingSavedText(prepared)).toEqual({ text: 'Nothing saved: At most 500 entries at once.', bad: true });
  });
});

describe('refusals', () => {
  const plan = planBatch([row(1, { dry: '20' }), row(2, { cured: '30' })], NOW);
  it('puts the server’s errors on their cells and rows', () => {
    const found = refusalsFrom(
      [
        ['entries.1.weighings.0.massG', 'already weighed'],
        ['entries.0', 'coupon moved'],
        ['other', 'busy'],
      ],
      plan,
    );
    expect(found).toEqual({ cells: { 2: { cured: 'already weighed' } }, rows: { 1: 'coupon moved' }, general: 'busy' });
    const merged = mergeRefusals({ cells: { 2: { dry: 'a' } }, rows: {}, general: null }, found);
    expect(merged.cells[2]).toEqual({ dry: 'a', cured: 'already weighed' });
  });

  it('says the refusal without the paths', () => {
    expect(refusedText('entries.1.weighings.0.massG: a cured weighing exists')).toBe('Nothing saved: a cured weighing exists');
  });
});

describe('after a save', () => {
  it('says what was written, what stayed back and how many coupons carry a warning', () => {
    expect(savedText({ written: { weighings: 6, checks: 1 }, coupons: [], warnings: [{ couponId: 1 }, { couponId: 1 }] }, 3, 0)).toEqual({
      text: 'Saved 6 weighings and 1 size set for 3 coupons. 1 coupon has a warning in the Check column.',
      bad: false,
    });
    expect(savedText({ written: { weighings: 1, checks: 0 }, coupons: [], warnings: [] }, 1, 2).text).toBe(
      'Saved 1 weighing and 0 size sets for 1 coupon. 2 rows with problems not saved.',
    );
  });

  it('replaces the saved rows by id and keeps the others as they were', () => {
    const a = testCoupon({ id: 1 });
    const b = testCoupon({ id: 2 });
    const b2 = { ...b, version: 2 };
    const out = replaceSaved([a, b], [b2]);
    expect(out[0]).toBe(a);
    expect(out[1]).toBe(b2);
  });

  it('drops the saved rows’ drafts but keeps what was typed while the request was out', () => {
    const sent = { 1: { dry: '20' }, 2: { dry: 'x' } };
    const now = { 1: { dry: '20', cured: '25' }, 2: { dry: 'x' }, 3: { dry: '21' } };
    const plan = { entries: [{ couponId: 1 }] };
    expect(dropSaved(now, sent, plan)).toEqual({ 1: { cured: '25' }, 2: { dry: 'x' }, 3: { dry: '21' } });
    expect(dropSaved(sent, sent, plan)).toEqual({ 2: { dry: 'x' } });
  });
});
