import { describe, expect, it } from 'vitest';
import { paths } from './paths';

describe('paths', () => {
  it('fills params, leaves out empty search values, and adds the hash', () => {
    expect(paths.run.href({ id: 7 }, { stage: 'soak' }, 'stage-soak')).toBe('/runs/7?stage=soak#stage-soak');
    expect(paths.runCoupons.href({ id: 3 }, { focus: 12, col: undefined })).toBe('/runs/3/coupons?focus=12');
    expect(paths.coupons.href({ trialId: 2, runId: null })).toBe('/coupons?trialId=2');
    expect(paths.bench.href()).toBe('/');
    expect(paths.wikiPage.href({ slug: 'ash & oak' })).toBe('/wiki/ash%20%26%20oak');
  });

  it('has one pattern per route', () => {
    const patterns = Object.values(paths).map((p) => p.path);
    expect(new Set(patterns).size).toBe(patterns.length);
  });
});
