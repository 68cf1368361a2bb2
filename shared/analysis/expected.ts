import type { AnalysisCoupon, RunExpected } from '../schemas/analysis';
import { groupKey } from './groups';
import { fitThroughOrigin, fmt, statsOf } from './stats';

/** A run whose coupons fall short of expected by more than this on average (and surely below 0) is flagged. Own rule. */
export const RUN_SHORTFALL_PCT = 10;
/** History needs this many coupons of a species × resin before it predicts anything. */
export const MIN_HISTORY = 3;

export interface FillFraction {
  species: string;
  resin: string;
  fillFraction: number;
  ci95: [number, number];
  nHistory: number;
}

/**
 * The shop's fitted fraction of voids filled per species × resin: least squares through the origin of
 * actual WPG on the theoretical maximum WPG (porosity model at each coupon's measured SG).
 */
export function fillFractions(history: readonly AnalysisCoupon[]): Map<string, FillFraction> {
  const groups = new Map<string, AnalysisCoupon[]>();
  for (const c of history) {
    if (c.role !== 'treated' || c.wpgPct === null || c.maxWpgPct === null || c.resinId === null) continue;
    const k = groupKey(c);
    const l = groups.get(k);
    if (l) l.push(c);
    else groups.set(k, [c]);
  }
  const out = new Map<string, FillFraction>();
  for (const [k, list] of groups) {
    if (list.length < MIN_HISTORY) continue;
    const f = fitThroughOrigin(
      list.map((c) => c.maxWpgPct as number),
      list.map((c) => c.wpgPct as number),
    );
    const first = list[0] as AnalysisCoupon;
    out.set(k, { species: first.speciesName, resin: first.resinName ?? '', fillFraction: f.slope, ci95: f.ci95, nHistory: f.n });
  }
  return out;
}

/**
 * Expected against actual for one run: each treated coupon's expected WPG is its species × resin fill
 * fraction (from the shop's other runs) times its own theoretical maximum. The run falls short as a
 * whole when the mean relative difference is below −RUN_SHORTFALL_PCT % and its 95 % CI lies below 0.
 */
export function expectedForRun(runId: number, runCoupons: readonly AnalysisCoupon[], otherRuns: readonly AnalysisCoupon[]): RunExpected {
  const fractions = fillFractions(otherRuns);
  const treated = runCoupons.filter((c) => c.role === 'treated');
  const used = new Map<string, FillFraction>();
  const coupons: RunExpected['coupons'] = treated.map((c) => {
    const f = fractions.get(groupKey(c));
    const base = { id: c.id, tag: c.tag, species: c.speciesName, resin: c.resinName ?? '—', actualWpgPct: c.wpgPct };
    if (!f)
      return {
        ...base,
        expectedWpgPct: null,
        differencePct: null,
        note: `No history: fewer than ${MIN_HISTORY} coupons of this species and resin in other runs`,
      };
    used.set(groupKey(c), f);
    if (c.maxWpgPct === null) return { ...base, expectedWpgPct: null, differencePct: null, note: 'No measured SG, so no theoretical maximum to scale' };
    const expected = f.fillFraction * c.maxWpgPct;
    if (c.wpgPct === null) return { ...base, expectedWpgPct: expected, differencePct: null, note: 'Not weighed after the cure yet' };
    return { ...base, expectedWpgPct: expected, differencePct: ((c.wpgPct - expected) / expected) * 100, note: null };
  });
  const diffs = coupons.map((c) => c.differencePct).filter((v): v is number => v !== null);
  const s = statsOf(diffs);
  let status: RunExpected['run']['status'];
  let message: string;
  if (treated.length === 0 || coupons.every((c) => c.actualWpgPct === null)) {
    status = 'no-data';
    message = 'No treated coupon of this run has been weighed after the cure yet.';
  } else if (!s) {
    status = 'no-history';
    message = `The shop has too little history (at least ${MIN_HISTORY} coupons of the same species and resin in other runs) to say what this run should have reached.`;
  } else {
    const ci = s.ci95;
    const range = ci ? ` (95 % CI ${fmt(ci[0])} to ${fmt(ci[1])} %)` : '';
    const n = `${s.n} coupon${s.n === 1 ? '' : 's'}`;
    if (s.mean < -RUN_SHORTFALL_PCT && ci && ci[1] < 0) {
      status = 'short';
      message =
        `This run fell short as a whole: its ${n} reached on average ${fmt(-s.mean)} % less uptake than the shop's own history predicts for their species and resin${range}. ` +
        'When a whole run falls short, look at the process rather than the wood: a vacuum leak, wood that was not dry, or a tired resin lot.';
    } else if (s.mean > RUN_SHORTFALL_PCT && ci && ci[0] > 0) {
      status = 'above';
      message = `This run's ${n} took up on average ${fmt(s.mean)} % more than the shop's history predicts${range}.`;
    } else {
      status = 'as-expected';
      message = `This run's ${n} reached on average ${fmt(Math.abs(s.mean))} % ${s.mean < 0 ? 'less' : 'more'} than the shop's history predicts${range}, within what the history leads one to expect.`;
    }
  }
  return {
    runId,
    coupons,
    basis: [...used.values()],
    run: { n: diffs.length, meanDifferencePct: s?.mean ?? null, ci95: s?.ci95 ?? null, status, message },
  };
}
