import { bench, describe } from 'vitest';
import { createAnalysisService } from './analysis.service';
import { generatedShop } from './generated-shop';

/*
 * "First view" is a new service with nothing held: every coupon is read from the results table.
 * "Cold" is the first view after a write: every iteration first rewrites one results row (same value), which
 * gives the data a new version, so the held coupons are patched (that row read again) and every answer is
 * computed from scratch. "Warm" is a repeated view of unchanged data, served from the answer cache after a
 * version check. bench/compare-server.ts times the same as CPU time and writes bench/compare-results.md.
 */
for (const n of [10_000, 100_000]) {
  const shop = generatedShop(n);
  const service = createAnalysisService({ db: shop.database.db, now: () => new Date() });
  const touch = shop.database.sqlite.prepare('update coupon_results set wpg_pct = wpg_pct where coupon_id = (select min(coupon_id) from coupon_results)');
  const [r1, r2] = shop.resinIds as [number, number];
  describe(`analysis over ${n} generated coupons`, () => {
    bench('first view: summary, both fits and one two-group test, nothing held', () => {
      const fresh = createAnalysisService({ db: shop.database.db, now: () => new Date() });
      fresh.overview({}, 'measured');
      fresh.compare({}, { resinId: r1 }, { resinId: r2 }, 'wpgPct');
    });
    bench('cold: summary by species × resin, both fits (and SG + thickness), outliers, plot data', () => {
      touch.run();
      service.overview({}, 'measured');
    });
    bench('cold: one two-group test (two resins, all species)', () => {
      touch.run();
      service.compare({}, { resinId: r1 }, { resinId: r2 }, 'wpgPct');
    });
    bench('cold: summary, both fits and one two-group test, one request each', () => {
      touch.run();
      service.overview({}, 'measured');
      service.compare({}, { resinId: r1 }, { resinId: r2 }, 'wpgPct');
    });
    bench('warm: the same two requests again, data unchanged', () => {
      service.overview({}, 'measured');
      service.compare({}, { resinId: r1 }, { resinId: r2 }, 'wpgPct');
    });
  });
}
