import { hardnessGain } from '../domain/index';
import type { HardnessScale } from '../constants/records';
import type { AnalysisCoupon, GroupRow, SgBasis } from '../schemas/analysis';
import { SCALE_CODES, type CouponColumns } from './columns';
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
 * The species × resin table over the included treated coupons (positions in `cols`): n (coupons, boards),
 * mean WPG, resin loading, void fill, ASE (volume basis) and WRE (mass basis, never pooled with ASE) with
 * 95 % CIs (the core's `summarize`), and hardness gain against the controls (positions in `cols`) of the
 * same species on the same scale (the core's `hardnessGain`). Read column by column.
 */
export function speciesResinGroups(cols: CouponColumns, included: readonly number[], controls: readonly number[]): GroupRow[] {
  // A numeric key (ids are small positive integers) spares a string per coupon; same grouping as groupKey.
  const groups = new Map<number, number[]>();
  for (const p of included) {
    const resin = cols.resinId[p] as number;
    const k = (cols.speciesId[p] as number) * 1e7 + (resin === resin ? resin : 0);
    const list = groups.get(k);
    if (list) list.push(p);
    else groups.set(k, [p]);
  }
  // Control hardness by species and scale, gathered once rather than filtered again for every group.
  const controlHardness = new Map<number, number[]>();
  for (const p of controls) {
    const scale = cols.hardnessScale[p] as number;
    if (scale === 0) continue;
    const k = (cols.speciesId[p] as number) * 8 + scale;
    const list = controlHardness.get(k);
    if (list) list.push(cols.hardnessValue[p] as number);
    else controlHardness.set(k, [cols.hardnessValue[p] as number]);
  }
  const push = (to: number[], v: number) => {
    if (v === v) to.push(v);
  };
  const rows: GroupRow[] = [];
  for (const list of groups.values()) {
    const first = cols.coupon(list[0] as number);
    // One pass over the group for every column of the table.
    const wpg: number[] = [];
    const loading: number[] = [];
    const fill: number[] = [];
    const ase: number[] = [];
    const wre: number[] = [];
    const scaleCounts = [0, 0, 0, 0];
    const boards = new Set<number>();
    let nNoBoard = 0;
    for (const p of list) {
      push(wpg, cols.wpgPct[p] as number);
      push(loading, cols.resinLoadingKgM3[p] as number);
      push(fill, cols.voidFillPct[p] as number);
      push(ase, cols.asePct[p] as number);
      push(wre, cols.wrePct[p] as number);
      const sc = cols.hardnessScale[p] as number;
      scaleCounts[sc] = (scaleCounts[sc] as number) + 1;
      const b = cols.board[p] as number;
      if (b >= 0) boards.add(b);
      else nNoBoard++;
    }
    // The most common scale; a tie goes to the scale met first, as counting in coupon order did.
    let scale = 0;
    let most = 0;
    const seen: number[] = [];
    for (const p of list) {
      const s = cols.hardnessScale[p] as number;
      if (s === 0 || seen.includes(s)) continue;
      seen.push(s);
      if ((scaleCounts[s] as number) > most) [scale, most] = [s, scaleCounts[s] as number];
      if (seen.length === 3) break;
    }
    let gain: GroupRow['hardnessGain'] = null;
    if (scale > 0) {
      const t: number[] = [];
      for (const p of list) if (cols.hardnessScale[p] === scale) t.push(cols.hardnessValue[p] as number);
      const ctl = controlHardness.get((cols.speciesId[list[0] as number] as number) * 8 + scale) ?? [];
      if (t.length > 0 && ctl.length > 0)
        gain = { ratio: hardnessGain(t, ctl), scale: SCALE_CODES[scale] as HardnessScale, nTreated: t.length, nControl: ctl.length };
    }
    rows.push({
      speciesId: first.speciesId,
      speciesName: first.speciesName,
      resinId: first.resinId,
      resinName: first.resinName,
      nCoupons: list.length,
      nBoards: boards.size,
      nNoBoard,
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
