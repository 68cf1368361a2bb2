import { hardnessGain } from '../domain/index';
import type { HardnessScale } from '../constants/records';
import type { AnalysisCoupon, GroupRow, SgBasis } from '../schemas/analysis';
import { statsOf } from './stats';

/** The oven-dry SG a coupon is placed at: its own (mass over volume) or its species' reference. */
export function sgOf(c: AnalysisCoupon, basis: SgBasis): number | null {
  return basis === 'measured' ? c.drySg : c.referenceSg;
}

/**
 * Why a treated coupon cannot enter the uptake analysis (empty when it can). Reasons come from the
 * results table's record of blank metrics where it has one; otherwise they name the missing reading.
 */
export function exclusionReasons(c: AnalysisCoupon, basis: SgBasis): string[] {
  const reasons: string[] = [];
  if (c.wpgPct === null) {
    if (c.blankReasons.wpgPct) reasons.push(c.blankReasons.wpgPct);
    else if (c.dryMassG === null) reasons.push('No dry weighing');
    else if (c.curedMassG === null) reasons.push('No cured weighing');
    else reasons.push('WPG is blank');
  }
  if (sgOf(c, basis) === null) {
    if (basis === 'handbook') reasons.push(`The species ${c.speciesName} has no reference SG`);
    else if (c.blankReasons.drySg) reasons.push(c.blankReasons.drySg);
    else if (c.dryMassG !== null) reasons.push('No dry dimensions, so no measured SG');
    else if (c.wpgPct !== null) reasons.push('No dry weighing, so no measured SG');
  }
  return reasons.length > 1 ? [...new Set(reasons)] : reasons;
}

/** Group key species × resin. */
export const groupKey = (c: Pick<AnalysisCoupon, 'speciesId' | 'resinId'>) => `${c.speciesId}|${c.resinId ?? 'none'}`;

function mostCommonScale(values: readonly { hardnessScale: HardnessScale | null }[]): HardnessScale | null {
  const counts = new Map<HardnessScale, number>();
  for (const v of values) if (v.hardnessScale) counts.set(v.hardnessScale, (counts.get(v.hardnessScale) ?? 0) + 1);
  let best: HardnessScale | null = null;
  let n = 0;
  for (const [k, c] of counts) if (c > n) [best, n] = [k, c];
  return best;
}

/** Distinct named boards and coupons with no board named, in a list of coupons. */
export function boardCounts(list: readonly Pick<AnalysisCoupon, 'sourceBoard'>[]): { nBoards: number; nNoBoard: number } {
  const boards = new Set<string>();
  let nNoBoard = 0;
  for (const c of list) {
    if (c.sourceBoard) boards.add(c.sourceBoard);
    else nNoBoard++;
  }
  return { nBoards: boards.size, nNoBoard };
}

/**
 * The species × resin table over the included treated coupons: n (coupons, boards), mean WPG, resin
 * loading, void fill, ASE (volume basis) and WRE (mass basis, never pooled with ASE) with 95 % CIs (the core's `summarize`), and hardness gain against the
 * controls of the same species on the same scale (the core's `hardnessGain`).
 */
export function speciesResinGroups(included: readonly AnalysisCoupon[], controls: readonly AnalysisCoupon[]): GroupRow[] {
  // A numeric key (ids are small positive integers) spares a string per coupon; same grouping as groupKey.
  const groups = new Map<number, AnalysisCoupon[]>();
  for (const c of included) {
    const k = c.speciesId * 1e7 + (c.resinId ?? 0);
    const list = groups.get(k);
    if (list) list.push(c);
    else groups.set(k, [c]);
  }
  // Control hardness by species and scale, gathered once rather than filtered again for every group.
  const controlHardness = new Map<string, number[]>();
  for (const c of controls) {
    if (c.hardnessValue === null || c.hardnessScale === null) continue;
    const k = `${c.speciesId}|${c.hardnessScale}`;
    const list = controlHardness.get(k);
    if (list) list.push(c.hardnessValue);
    else controlHardness.set(k, [c.hardnessValue]);
  }
  const rows: GroupRow[] = [];
  for (const list of groups.values()) {
    const first = list[0] as AnalysisCoupon;
    // One pass over the group for every column of the table.
    const wpg: number[] = [];
    const loading: number[] = [];
    const fill: number[] = [];
    const ase: number[] = [];
    const wre: number[] = [];
    const hard: AnalysisCoupon[] = [];
    for (const c of list) {
      if (c.wpgPct !== null) wpg.push(c.wpgPct);
      if (c.resinLoadingKgM3 !== null) loading.push(c.resinLoadingKgM3);
      if (c.voidFillPct !== null) fill.push(c.voidFillPct);
      if (c.asePct !== null) ase.push(c.asePct);
      if (c.wrePct !== null) wre.push(c.wrePct);
      if (c.hardnessValue !== null && c.hardnessScale !== null) hard.push(c);
    }
    const scale = mostCommonScale(hard);
    let gain: GroupRow['hardnessGain'] = null;
    if (scale) {
      const t = hard.filter((c) => c.hardnessScale === scale).map((c) => c.hardnessValue as number);
      const ctl = controlHardness.get(`${first.speciesId}|${scale}`) ?? [];
      if (t.length > 0 && ctl.length > 0) gain = { ratio: hardnessGain(t, ctl), scale, nTreated: t.length, nControl: ctl.length };
    }
    rows.push({
      speciesId: first.speciesId,
      speciesName: first.speciesName,
      resinId: first.resinId,
      resinName: first.resinName,
      nCoupons: list.length,
      ...boardCounts(list),
      wpg: statsOf(wpg),
      resinLoading: statsOf(loading),
      voidFill: statsOf(fill),
      hardnessGain: gain,
      ase: statsOf(ase),
      wre: statsOf(wre),
    });
  }
  return rows.sort((a, b) => a.speciesName.localeCompare(b.speciesName) || (a.resinName ?? '').localeCompare(b.resinName ?? ''));
}
