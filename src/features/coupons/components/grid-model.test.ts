import { describe, expect, it } from 'vitest';
import { columnIndexOf, ENTRY_COLUMNS, isLocked, rowModel, savable, showStored, storedValue } from './grid-model';
import { converter, testCoupon, weighing } from './grid-test-coupon';

const NOW = '2026-03-01T10:00:00.000Z';
const metric = converter('metric');
const col = (id: string) => ENTRY_COLUMNS[columnIndexOf(id)]!;

describe('ENTRY_COLUMNS and columnIndexOf', () => {
  it('lists the bench order: dry mass and size, soaked mass, cured mass and size', () => {
    expect(ENTRY_COLUMNS.map((c) => c.id)).toEqual([
      'dry',
      'dry-length',
      'dry-width',
      'dry-thickness',
      'soaked',
      'cured',
      'cured-length',
      'cured-width',
      'cured-thickness',
    ]);
    expect(columnIndexOf('cured')).toBe(5);
    expect(columnIndexOf('nonsense')).toBe(0);
    expect(columnIndexOf(null)).toBe(0);
  });
});

describe('isLocked and storedValue', () => {
  it('locks a stage that has its reading, and the treated-only columns of a control', () => {
    const c = testCoupon({ id: 10 });
    c.weighings = [weighing(10, 'dry', 20.5, '2026-01-01T00:00:00.000Z'), weighing(10, 'dry', 20.25, '2026-01-03T00:00:00.000Z')];
    expect(isLocked(c, col('dry'))).toBe('stored');
    expect(isLocked(c, col('cured'))).toBeNull();
    // The newest current reading is the one shown.
    expect(storedValue(c, col('dry'))).toBe(20.25);
    expect(storedValue(c, col('cured'))).toBeNull();
    const control = testCoupon({ role: 'control' });
    expect(isLocked(control, col('soaked'))).toBe('control');
    expect(isLocked(control, col('cured-length'))).toBe('control');
    expect(isLocked(control, col('dry-length'))).toBeNull();
  });

  it('shows a stored value in display units to 4 decimals at most', () => {
    // 1 oz = 28.349523125 g exactly (NIST SP 811 App. B: 1 lb = 453.59237 g, 1 oz = 1/16 lb).
    expect(showStored(28.349523125, col('dry'), converter('us'))).toBe('1');
    expect(showStored(20.123456, col('dry'), metric)).toBe('20.1235');
    expect(showStored(null, col('dry'), metric)).toBe('');
  });
});

describe('rowModel', () => {
  it('computes WPG from typed values through the shared metric functions, in SI', () => {
    const c = testCoupon();
    const m = rowModel(c, { dry: '20', cured: '25' }, metric, NOW);
    // WPG = (cured − dry) / dry × 100 (common practice): (25 − 20) / 20 × 100 = 25 %.
    expect(m.metrics.wpgPct).toBeCloseTo(25, 10);
    expect(m.typed).toEqual({ dry: 20, cured: 25 });
    expect(m.edited).toBe(true);
    expect(savable(m)).toBe(true);
  });

  it('reads typed values in the user units and a decimal comma', () => {
    const m = rowModel(testCoupon(), { dry: '1', cured: '1,5' }, converter('us'), NOW);
    expect(m.typed.dry).toBeCloseTo(28.349523125, 9);
    expect(m.typed.cured).toBeCloseTo(1.5 * 28.349523125, 9);
  });

  it('refuses what is not a number and a cured mass below the dry mass, and holds the row back', () => {
    const m = rowModel(testCoupon(), { dry: '20', cured: '18', 'dry-length': 'abc' }, metric, NOW);
    expect(m.problems['dry-length']).toBe('“abc” is not a number');
    expect(m.problems.cured).toMatch(/cannot be below the dry mass/);
    // The impossible value is left out of the computed columns.
    expect(m.metrics.wpgPct).toBeNull();
    expect(savable(m)).toBe(false);
  });

  it('waits for a whole size set before saving it', () => {
    const m = rowModel(testCoupon(), { 'dry-length': '120', 'dry-width': '25' }, metric, NOW);
    expect(m.incomplete).toEqual(['Give the dry length, width and thickness together']);
    expect(savable(m)).toBe(false);
    const whole = rowModel(testCoupon(), { 'dry-length': '120', 'dry-width': '25', 'dry-thickness': '20' }, metric, NOW);
    expect(whole.incomplete).toEqual([]);
    expect(savable(whole)).toBe(true);
  });

  it('ignores blank cells, and typed values on a locked cell', () => {
    const c = testCoupon({ id: 20 });
    c.weighings = [weighing(20, 'dry', 20)];
    const m = rowModel(c, { dry: '30', cured: '  ' }, metric, NOW);
    expect(m.typed).toEqual({});
    expect(m.edited).toBe(false);
    expect(m.metrics.dryMassG).toBe(20);
  });

  it('checks a typed cured mass against the stored dry mass', () => {
    const c = testCoupon({ id: 21 });
    c.weighings = [weighing(21, 'dry', 20)];
    expect(rowModel(c, { cured: '19.5' }, metric, NOW).problems.cured).toMatch(/below the dry mass/);
    expect(rowModel(c, { cured: '22' }, metric, NOW).metrics.wpgPct).toBeCloseTo(10, 10);
  });
});
