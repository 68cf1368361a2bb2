import { describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import { fitLinear, maxWeightPercentGain, summarize, welchTest } from '../domain/index';
import type { AnalysisCoupon } from '../schemas/analysis';
import { boardMeans, compareGroups } from './compare';
import { groupsCsv, toCsv } from './csv';
import { expectedForRun, fillFractions } from './expected';
import { buildOverview } from './overview';
import { fitThroughOrigin, t975 } from './stats';
import { thinPoints } from './thin';

/** Deterministic uniform numbers (mulberry32, public domain) and normals (Box–Muller). */
function rng(seed: number) {
  let a = seed >>> 0;
  const u = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const normal = () => Math.sqrt(-2 * Math.log(1 - u())) * Math.cos(2 * Math.PI * u());
  return { u, normal };
}

let nextId = 1;
function coupon(over: Partial<AnalysisCoupon> = {}): AnalysisCoupon {
  const id = nextId++;
  return {
    id,
    tag: `C-${id}`,
    trialId: 1,
    conditionId: 1,
    runId: 1,
    runCode: 'R-1',
    speciesId: 1,
    speciesName: 'Maple, red',
    speciesOrigin: 'handbook',
    resinId: 1,
    resinName: 'Clear',
    resinDensityGcm3: 1.15,
    lotId: 1,
    role: 'treated',
    sourceBoard: null,
    thicknessMm: 20,
    dryMassG: 20,
    curedMassG: 30,
    drySg: 0.5,
    referenceSg: 0.52,
    referenceSgCov: 0.1,
    wpgPct: 50,
    resinLoadingKgM3: 250,
    voidFillPct: 60,
    maxWpgPct: 153,
    swellingPct: null,
    asePct: null,
    hardnessValue: null,
    hardnessScale: null,
    wrePct: null,
    treatedOn: '2026-01-01',
    blankReasons: {},
    ...over,
  };
}

describe('uptake fits on a generated set with a known slope', () => {
  // WPG = 160 − 150·SG + noise(SD 4), 300 coupons, SG 0.35–0.75, thickness 10–40 mm with a −0.3 %/mm effect.
  const r = rng(42);
  const rows = Array.from({ length: 300 }, () => {
    const sg = 0.35 + 0.4 * r.u();
    const th = 10 + 30 * r.u();
    return coupon({ drySg: sg, thicknessMm: th, wpgPct: 160 - 150 * sg - 0.3 * th + 4 * r.normal() });
  });
  const o = buildOverview(rows, 'measured');

  it('recovers the slope on SG within its 95 % CI, and the thickness slope together with it', () => {
    const fit = o.multipleFit!;
    const sg = fit.coefficients[1]!;
    const th = fit.coefficients[2]!;
    expect(sg.ci95[0]).toBeLessThan(-150);
    expect(sg.ci95[1]).toBeGreaterThan(-150);
    expect(th.ci95[0]).toBeLessThan(-0.3);
    expect(th.ci95[1]).toBeGreaterThan(-0.3);
    expect(fit.residualSd).toBeGreaterThan(3.5);
    expect(fit.residualSd).toBeLessThan(4.5);
    expect(fit.sentence).toMatch(/At equal thickness, each 0\.1 of SG lowers uptake by about 1\d\.\d points/);
  });

  it('gives the core fitLinear numbers for the WPG–SG line, and a band that is t·s/√n wide at the mean SG', () => {
    const x = rows.map((c) => c.drySg as number);
    const y = rows.map((c) => c.wpgPct as number);
    const core = fitLinear(x, y);
    const fit = o.densityFit!;
    expect(fit.coefficients[0]!.estimate).toBe(core.intercept);
    expect(fit.coefficients[1]!.estimate).toBe(core.slope);
    expect(fit.coefficients[1]!.se).toBe(core.slopeSe);
    expect(fit.r2).toBe(core.r2);
    expect(fit.coefficients[1]!.ci95[0]).toBeLessThan(-150 - 0.3 * 0); // thickness is independent of SG here
    const mean = x.reduce((s, v) => s + v, 0) / x.length;
    const closest = fit.band.reduce((b, p) => (Math.abs(p.x - mean) < Math.abs(b.x - mean) ? p : b));
    const minHalf = Math.min(...fit.band.map((p) => (p.hi - p.lo) / 2));
    expect(minHalf).toBeGreaterThanOrEqual(t975(298) * (core.residualSd / Math.sqrt(300)) - 1e-9);
    expect((closest.hi - closest.lo) / 2).toBeLessThan(1.01 * t975(298) * (core.residualSd / Math.sqrt(300)) + 0.05);
    expect(fit.sentence).toMatch(/WPG falls by about 1\d\.\d points for each 0\.1 rise in oven-dry SG/);
  });

  it('draws the theoretical-maximum curve from the porosity model and the implied fill fraction', () => {
    const tm = o.theoreticalMax[0]!;
    for (const p of tm.curve) expect(p.y).toBeCloseTo(maxWeightPercentGain(p.x, 1.15), 10);
    const fill = tm.impliedFill!;
    const direct = fitThroughOrigin(
      rows.map((c) => maxWeightPercentGain(c.drySg as number, 1.15)),
      rows.map((c) => c.wpgPct as number),
    );
    expect(fill.fraction).toBe(direct.slope);
    expect(fill.n).toBe(300);
  });

  it('thins the drawing, not the fit, above the point budget, and says how many are shown', () => {
    const small = buildOverview(rows, 'measured', 100);
    expect(small.plots.wpgVsSg.method).toBe('thinned');
    expect(small.plots.wpgVsSg.total).toBe(300);
    expect(small.plots.wpgVsSg.shown).toBe(small.plots.wpgVsSg.points.length);
    expect(small.plots.wpgVsSg.shown).toBeLessThanOrEqual(110);
    expect(small.densityFit!.n).toBe(300);
    expect(o.plots.wpgVsSg.method).toBe('all');
    expect(o.plots.wpgVsSg.points).toHaveLength(300);
  });
});

describe('fit through the origin', () => {
  it('is Σxy/Σx² with SE s/√Σx² on n − 1 df (hand-worked: x = 1,2,3, y = 2,4,7)', () => {
    // Σxy = 2 + 8 + 21 = 31, Σx² = 14, b = 31/14; residuals 2 − b, 4 − 2b, 7 − 3b.
    const b = 31 / 14;
    const sse = (2 - b) ** 2 + (4 - 2 * b) ** 2 + (7 - 3 * b) ** 2;
    const f = fitThroughOrigin([1, 2, 3], [2, 4, 7]);
    expect(f.slope).toBeCloseTo(b, 14);
    expect(f.se).toBeCloseTo(Math.sqrt(sse / 2) / Math.sqrt(14), 14);
  });
});

describe('exclusions are listed with reasons, never dropped', () => {
  it('names the missing reading or the blank reason the results table gives', () => {
    const rows = [
      coupon(),
      coupon(),
      coupon(),
      coupon({ tag: 'NO-CURED', curedMassG: null, wpgPct: null }),
      coupon({ tag: 'NO-DRY', dryMassG: null, curedMassG: null, wpgPct: null, drySg: null }),
      coupon({ tag: 'NO-DIMS', drySg: null }),
      coupon({ tag: 'CONTRA', wpgPct: null, blankReasons: { wpgPct: 'A later mass is below the dry mass; one of the weighings is off' } }),
      coupon({ tag: 'CTL', role: 'control', resinId: null, resinName: null, wpgPct: null, curedMassG: null }),
    ];
    const o = buildOverview(rows, 'measured');
    const by = Object.fromEntries(o.excluded.map((e) => [e.tag, e.reasons]));
    expect(by['NO-CURED']).toEqual(['No cured weighing']);
    expect(by['NO-DRY']).toEqual(['No dry weighing']);
    expect(by['NO-DIMS']).toEqual(['No dry dimensions, so no measured SG']);
    expect(by['CONTRA']).toEqual(['A later mass is below the dry mass; one of the weighings is off']);
    expect(by['CTL']).toBeUndefined();
    expect(o.counts).toEqual({ matched: 8, treatedIncluded: 3, controls: 1, excluded: 4 });
    // With the handbook SG the coupon without dimensions comes back in.
    const h = buildOverview(rows, 'handbook');
    expect(h.excluded.map((e) => e.tag)).not.toContain('NO-DIMS');
  });
});

describe('species × resin table', () => {
  it('gives n coupons and boards, the core summary of WPG and hardness gain against the species controls', () => {
    const wpg = [40, 44, 47, 51];
    const rows = [
      ...wpg.map((w, i) => coupon({ wpgPct: w, sourceBoard: i < 2 ? 'B1' : i === 2 ? 'B2' : null, hardnessValue: 70 + i, hardnessScale: 'shore-d' })),
      coupon({ role: 'control', resinId: null, resinName: null, wpgPct: null, hardnessValue: 55, hardnessScale: 'shore-d' }),
      coupon({ role: 'control', resinId: null, resinName: null, wpgPct: null, hardnessValue: 57, hardnessScale: 'shore-d' }),
    ];
    const g = buildOverview(rows, 'measured').groups;
    expect(g).toHaveLength(1);
    const s = summarize(wpg);
    expect(g[0]!.nCoupons).toBe(4);
    expect(g[0]!.nBoards).toBe(2);
    expect(g[0]!.nNoBoard).toBe(1);
    expect(g[0]!.wpg).toEqual({ n: 4, mean: s.mean, sd: s.sd, ci95: s.ci95 });
    expect(g[0]!.hardnessGain!.ratio).toBeCloseTo(71.5 / 56, 12);
  });
});

describe('two-group comparison', () => {
  const clearA = [31.2, 35.4, 29.8, 33.1, 36.0, 32.5];
  const dyedB = [27.4, 30.1, 26.9, 29.5, 28.8];
  const rows = [
    ...clearA.map((w, i) => coupon({ resinId: 1, resinName: 'Clear', wpgPct: w, sourceBoard: `A${i}` })),
    ...dyedB.map((w, i) => coupon({ resinId: 2, resinName: 'Dyed', wpgPct: w, sourceBoard: `B${i}` })),
  ];

  it('is the core welchTest on the coupons, with a sentence that gives both n and the interval', () => {
    const r = compareGroups(rows, { resinId: 1 }, { resinId: 2 }, 'wpgPct');
    expect(r.welch).toEqual(welchTest(clearA, dyedB));
    expect(r.trust).toBe('coupons');
    expect(r.boardMeans).toBeNull();
    expect(r.sentence).toContain('6 coupons');
    expect(r.sentence).toContain('5 coupons');
    expect(r.sentence).toMatch(/^Clear averaged \d+\.\d % WPG more than Dyed/);
    expect(r.sentence).toContain('The interval excludes zero');
    expect(r.effectSizeNote).toContain('pooled standard deviation');
    expect(r.effectSizeNote).toContain('J = 1 − 3/(4(nA + nB) − 9)');
    expect(r.warnings).toEqual([]);
  });

  it('warns when a group is too small to say much', () => {
    const r = compareGroups(rows.slice(0, 3).concat(rows.slice(6, 9)), { resinId: 1 }, { resinId: 2 }, 'wpgPct');
    expect(r.warnings.join(' ')).toMatch(/fewer than 5 coupons/);
  });

  it('compares board means when coupons share boards, and says to trust that', () => {
    // Group A: boards P, Q, R with 3 coupons each; group B: boards S, T, U, V with 2 each.
    const a = { P: [30, 31, 32], Q: [36, 35, 37], R: [33, 33, 34] };
    const b = { S: [28, 29], T: [31, 30], U: [27, 27], V: [29, 31] };
    const set = [
      ...Object.entries(a).flatMap(([board, ws]) => ws.map((w) => coupon({ resinId: 1, resinName: 'Clear', sourceBoard: board, wpgPct: w }))),
      ...Object.entries(b).flatMap(([board, ws]) => ws.map((w) => coupon({ resinId: 2, resinName: 'Dyed', sourceBoard: board, wpgPct: w }))),
    ];
    const r = compareGroups(set, { resinId: 1 }, { resinId: 2 }, 'wpgPct');
    const meansA = [31, 36, 100 / 3];
    const meansB = [28.5, 30.5, 27, 30];
    expect(r.trust).toBe('board-means');
    expect(r.a.nBoards).toBe(3);
    expect(r.boardMeans).toEqual({ nA: 3, nB: 4, ...welchTest(meansA, meansB) });
    expect(r.welch).toEqual(welchTest(Object.values(a).flat(), Object.values(b).flat()));
    expect(r.sentence).toContain('compared on the means of 3 and 4 source boards');
    expect(r.warnings.join(' ')).toMatch(/Only 3 and 4 source boards/);
  });

  it('averages per board, and a coupon without a board counts as its own unit', () => {
    const c1 = coupon({ sourceBoard: 'X' });
    const c2 = coupon({ sourceBoard: 'X' });
    const c3 = coupon({ sourceBoard: null });
    expect(
      boardMeans([
        { coupon: c1, value: 2 },
        { coupon: c2, value: 4 },
        { coupon: c3, value: 10 },
      ]).sort(),
    ).toEqual([10, 3]);
  });
});

describe('expected against actual for a run', () => {
  // History: 6 coupons of red maple in clear resin at exactly 60 % of their theoretical maximum.
  const history = [0.45, 0.5, 0.55, 0.6, 0.48, 0.52].map((sg) => {
    const max = maxWeightPercentGain(sg, 1.15);
    return coupon({ runId: 7, drySg: sg, maxWpgPct: max, wpgPct: 0.6 * max });
  });

  it('fits the shop fill fraction per species × resin', () => {
    const f = [...fillFractions(history).values()];
    expect(f).toHaveLength(1);
    expect(f[0]!.fillFraction).toBeCloseTo(0.6, 12);
    expect(f[0]!.nHistory).toBe(6);
  });

  it('flags a run whose coupons all reached about 45 % fill as short, with the numbers', () => {
    const run = [0.47, 0.5, 0.53, 0.56].map((sg, i) => {
      const max = maxWeightPercentGain(sg, 1.15);
      return coupon({ runId: 9, drySg: sg, maxWpgPct: max, wpgPct: (0.45 + 0.01 * (i % 2)) * max });
    });
    const r = expectedForRun(9, run, history);
    expect(r.coupons[0]!.expectedWpgPct).toBeCloseTo(0.6 * run[0]!.maxWpgPct!, 10);
    expect(r.coupons[0]!.differencePct).toBeCloseTo(-25, 8);
    expect(r.coupons[1]!.differencePct).toBeCloseTo((0.46 / 0.6 - 1) * 100, 8);
    expect(r.run.status).toBe('short');
    expect(r.run.meanDifferencePct).toBeCloseTo(((0.45 + 0.46) / 2 / 0.6 - 1) * 100, 8);
    expect(r.run.message).toMatch(/fell short as a whole: its 4 coupons reached on average 24\.2 % less/);
  });

  it('calls a run on the history as expected, and says when there is no history', () => {
    const run = [0.5, 0.55, 0.6].map((sg, i) => {
      const max = maxWeightPercentGain(sg, 1.15);
      return coupon({ runId: 9, drySg: sg, maxWpgPct: max, wpgPct: (0.6 + (i - 1) * 0.02) * max });
    });
    expect(expectedForRun(9, run, history).run.status).toBe('as-expected');
    expect(expectedForRun(9, run, []).run.status).toBe('no-history');
  });
});

describe('CSV export', () => {
  it('neutralises formula-like text cells and leaves numbers alone', () => {
    const csv = toCsv(
      ['name', 'value'],
      [
        ['=HYPERLINK("http://example.invalid","x")', -3.5],
        ['+1', 2],
        ['-cmd', 3],
        ['@SUM(A1)', 4],
        ['plain', null],
      ],
    );
    const parsed = Papa.parse<string[]>(csv.trim()).data;
    expect(parsed[1]).toEqual(['\'=HYPERLINK("http://example.invalid","x")', '-3.5']);
    expect(parsed[2]![0]).toBe("'+1");
    expect(parsed[3]![0]).toBe("'-cmd");
    expect(parsed[4]![0]).toBe("'@SUM(A1)");
    expect(parsed[5]).toEqual(['plain', '']);
  });

  it('writes the species × resin table with units in the header', () => {
    const rows = [40, 44, 47].map((w) => coupon({ wpgPct: w, speciesName: '=cmd|calc' }));
    const csv = groupsCsv(buildOverview(rows, 'measured').groups);
    const [header, first] = Papa.parse<string[]>(csv.trim()).data;
    expect(header).toContain('mean WPG %');
    expect(first![0]).toBe("'=cmd|calc");
    expect(Number(first![5])).toBeCloseTo(43.67, 2);
  });
});

describe('thinning', () => {
  it('keeps every species × resin in proportion and always keeps the outliers', () => {
    const pts = Array.from({ length: 1000 }, (_, i) => ({ id: i + 1, tag: `T${i}`, species: i < 800 ? 'A' : 'B', resin: 'R', x: i, y: i }));
    const t = thinPoints(pts, 100, new Set([999, 5]));
    expect(t.method).toBe('thinned');
    expect(t.points.filter((p) => p.species === 'A').length).toBeGreaterThanOrEqual(78);
    expect(t.points.filter((p) => p.species === 'B').length).toBeGreaterThanOrEqual(19);
    expect(t.points.some((p) => p.id === 999)).toBe(true);
    expect(new Set(t.points.map((p) => p.id)).size).toBe(t.points.length);
  });
});

describe('WRE apart from ASE', () => {
  it('keeps the mass-basis water-repellent effectiveness out of the ASE column', () => {
    const rows = [coupon({ asePct: 40 }), coupon({ asePct: 50 }), coupon({ wrePct: 20 }), coupon({ wrePct: 30 }), coupon({ wrePct: 40 })];
    const g = buildOverview(rows, 'measured').groups[0]!;
    expect(g.ase!.n).toBe(2);
    expect(g.ase!.mean).toBe(45);
    expect(g.wre!.n).toBe(3);
    expect(g.wre!.mean).toBe(30);
    expect(compareGroups(rows, { resinId: 1 }, { speciesId: 1 }, 'wrePct').sentence).toMatch(/water-repellent effectiveness \(WRE\)/);
  });
});
