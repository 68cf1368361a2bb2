import { and, asc, desc, eq } from 'drizzle-orm';
import type { Db } from '../../db/client';
import { writeAudit } from '../../db/audit';
import { checks, coupons, weighings } from '../../db/schema/coupons';
import { resinLots, resins, species } from '../../db/schema/reference';
import { runReadings, runStages, runs } from '../../db/schema/runs';
import { trialConditions, trials } from '../../db/schema/trials';
import type { CheckStage, RunStage, WeighingStage } from '../../../shared/constants/records';
import type { Role } from '../../../shared/constants/roles';
import { DEFAULT_CELL_WALL_DENSITY, absolutePressureFromGauge, percentVacuum } from '../../../shared/domain/index';
import { referenceOvenDrySg } from '../../../shared/coupons/plausibility';
import { convertPressure } from '../../../shared/units';
import { getShopSettings } from './runs.repo';

interface DemoContext {
  tx: Db;
  userIds: Record<Role, number>;
  now: Date;
}

/** The trial whose coupons the demo runs treat (written by the trials demo seeder). */
const DEMO_TRIAL_CODE = 'T26-001';
const DEMO_NOTE = 'Demo data: invented for trying the app. Its measurements are generated from the domain model plus random noise, not measured.';

/** mulberry32: a tiny seeded generator, so the demo is the same on every install. */
function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const HOUR = 3_600_000;
/** Rounds to `decimals` places, as an instrument would show the value. */
const round = (x: number, decimals: number) => Math.round(x * 10 ** decimals) / 10 ** decimals;

interface DemoCoupon {
  id: number;
  tag: string;
  role: 'treated' | 'control';
  speciesId: number;
  speciesName: string;
  refSg: number;
  resinId: number | null;
  thicknessMm: number;
}

/**
 * The demo's runs and coupon measurements: one run finished per resin, one soaking now, one drying,
 * with gauge readings in inHg at the shop's altitude, oven temperatures, and weighings and checks made
 * up from the domain model (dry mass from the blank's size and a density drawn around the species'
 * reference; uptake a void-fill fraction of the theoretical maximum) plus noise. Controls get the same
 * drying and a short water soak, so swelling and ASE show.
 */
export function seedRunsDemo({ tx, userIds, now }: DemoContext): void {
  const trial = tx.select().from(trials).where(eq(trials.code, DEMO_TRIAL_CODE)).get();
  if (!trial) return;
  const rnd = mulberry32(0x5eed2601);
  const normal = () => {
    // Box–Muller; 1 − u keeps the logarithm finite.
    const u = 1 - rnd();
    const v = rnd();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  };
  const tech = userIds.technician;
  const settings = getShopSettings(tx);
  const altitudeM = settings.altitudeM;
  const t0 = Math.floor(now.getTime() / HOUR) * HOUR;
  const at = (hoursFromNow: number) => new Date(t0 + hoursFromNow * HOUR).toISOString();

  const rows = tx
    .select({ coupon: coupons, sp: species, resinId: trialConditions.resinId, thicknessMm: trialConditions.thicknessMm })
    .from(coupons)
    .innerJoin(species, eq(coupons.speciesId, species.id))
    .leftJoin(trialConditions, eq(coupons.conditionId, trialConditions.id))
    .where(eq(coupons.trialId, trial.id))
    .orderBy(asc(coupons.id))
    .all();
  const demo: DemoCoupon[] = rows.map((r) => ({
    id: r.coupon.id,
    tag: r.coupon.tag,
    role: r.coupon.role,
    speciesId: r.coupon.speciesId,
    speciesName: r.sp.commonName,
    refSg: referenceOvenDrySg(r.sp) ?? 0.5,
    resinId: r.resinId,
    thicknessMm: r.thicknessMm ?? 0,
  }));
  // Controls are cut to the same size as the treated blanks of their species, so their swelling compares.
  const nominal = new Map(demo.filter((c) => c.thicknessMm > 0).map((c) => [c.speciesId, c.thicknessMm]));
  for (const c of demo) if (c.thicknessMm === 0) c.thicknessMm = nominal.get(c.speciesId) ?? 25;
  if (demo.length === 0) return;

  const resinRows = tx.select().from(resins).all();
  const resinById = new Map(resinRows.map((r) => [r.id, r]));
  const lotFor = (resinId: number) =>
    tx
      .select()
      .from(resinLots)
      .where(and(eq(resinLots.resinId, resinId), eq(resinLots.status, 'active')))
      .orderBy(desc(resinLots.activatedAt))
      .limit(1)
      .get();

  const weigh = (couponId: number, stage: WeighingStage, massG: number, when: string) => {
    const row = tx
      .insert(weighings)
      .values({ couponId, stage, massG: round(massG, 2), measuredAt: when, createdBy: tech })
      .returning()
      .get();
    writeAudit(tx, { actorId: tech, action: 'create', entity: 'weighing', entityId: row.id, after: row, reason: 'demo seed' });
  };
  const check = (couponId: number, values: Omit<typeof checks.$inferInsert, 'couponId' | 'createdBy'> & { stage: CheckStage }) => {
    const row = tx
      .insert(checks)
      .values({ ...values, couponId, createdBy: tech })
      .returning()
      .get();
    writeAudit(tx, { actorId: tech, action: 'create', entity: 'check', entityId: row.id, after: row, reason: 'demo seed' });
  };
  const stage = (runId: number, s: RunStage, values: Partial<typeof runStages.$inferInsert> & { startedAt: string }) =>
    tx
      .insert(runStages)
      .values({ runId, stage: s, createdBy: tech, ...values })
      .run();
  const reading = (runId: number, s: RunStage, when: string, inHg: number) => {
    const absoluteKpa = absolutePressureFromGauge(convertPressure(inHg, 'inHg', 'kPa'), altitudeM);
    tx.insert(runReadings)
      .values({
        runId,
        stage: s,
        at: when,
        gaugeValue: inHg,
        gaugeUnit: 'inHg',
        absoluteKpa,
        percentVacuum: percentVacuum(absoluteKpa, altitudeM),
        createdBy: tech,
      })
      .run();
  };

  // The blank as cut: a density drawn around the species' reference, a size around the nominal one.
  const blanks = new Map(
    demo.map((c) => {
      const sg = Math.min(1.2, Math.max(0.2, c.refSg * (1 + 0.07 * normal())));
      const dims = { lengthMm: round(120 + 0.4 * normal(), 2), widthMm: round(25 + 0.2 * normal(), 2), thicknessMm: round(c.thicknessMm + 0.2 * normal(), 2) };
      const volumeCm3 = (dims.lengthMm * dims.widthMm * dims.thicknessMm) / 1000;
      return [c.id, { sg, dims, volumeCm3, dryMassG: sg * volumeCm3, startMc: 0.06 + 0.03 * rnd() }];
    }),
  );

  /** Drying checks in the oven: the moisture above oven-dry falls off with a 4 h time constant. */
  const dryingChecks = (c: DemoCoupon, startH: number, hours: number[]) => {
    const b = blanks.get(c.id)!;
    for (const h of hours) weigh(c.id, 'drying-check', b.dryMassG * (1 + b.startMc * Math.exp(-h / 4)), at(startH + h));
  };
  const dryRecords = (c: DemoCoupon, whenH: number) => {
    const b = blanks.get(c.id)!;
    check(c.id, { kind: 'dimension', stage: 'dry', measuredAt: at(whenH), ...b.dims, method: 'calipers' });
    weigh(c.id, 'dry', b.dryMassG * (1 + b.startMc * Math.exp(-24 / 4)), at(whenH));
  };

  /** The uptake of one treated coupon: a void-fill share of its pores, by species, by resin, with noise. */
  const treat = (c: DemoCoupon, soakedH: number, curedH: number, wetTest: { afterH: number } | null) => {
    const b = blanks.get(c.id)!;
    const resin = c.resinId === null ? undefined : resinById.get(c.resinId);
    const liquid = resin?.liquidDensityGcm3 ?? 1.05;
    const resinFactor = resin && /dyed/i.test(resin.name) ? 0.92 : 1;
    // Lighter woods have more and more open pores; the numbers are invented for the demo.
    const fill = Math.min(0.95, Math.max(0.2, (1.05 - c.refSg) * resinFactor * (1 + 0.08 * normal())));
    const voidCm3 = b.volumeCm3 * (1 - b.sg / DEFAULT_CELL_WALL_DENSITY);
    const uptakeG = fill * voidCm3 * liquid;
    const dry = b.dryMassG * (1 + b.startMc * Math.exp(-24 / 4));
    weigh(c.id, 'soaked', dry + uptakeG * (1.02 + 0.01 * rnd()), at(soakedH));
    const cureLoss = 0.06 + 0.02 * normal() * 0.5;
    const cured = dry + uptakeG * (1 - cureLoss);
    weigh(c.id, 'cured', cured, at(curedH));
    const bulk = 1 + (0.004 + 0.003 * rnd()) / 3;
    const curedDims = {
      lengthMm: round(b.dims.lengthMm * bulk, 2),
      widthMm: round(b.dims.widthMm * bulk, 2),
      thicknessMm: round(b.dims.thicknessMm * bulk, 2),
    };
    check(c.id, { kind: 'dimension', stage: 'cured', measuredAt: at(curedH), ...curedDims, method: 'calipers' });
    check(c.id, {
      kind: 'hardness',
      stage: 'cured',
      measuredAt: at(curedH + 1),
      hardnessValue: round(72 + 3 * normal(), 0),
      hardnessScale: 'shore-d',
      method: 'durometer, 3 readings averaged',
    });
    if (wetTest) {
      // A short water soak: a well-stabilized blank gains only a few percent.
      const swell = 1 + (0.006 + 0.004 * rnd()) / 3;
      check(c.id, {
        kind: 'dimension',
        stage: 'wet-test',
        measuredAt: at(curedH + wetTest.afterH),
        lengthMm: round(curedDims.lengthMm * swell, 2),
        widthMm: round(curedDims.widthMm * swell, 2),
        thicknessMm: round(curedDims.thicknessMm * swell, 2),
        method: 'calipers after 1 h submerged, 1 h drained',
      });
      weigh(c.id, 'wet-test', cured * (1 + 0.015 + 0.01 * rnd()), at(curedH + wetTest.afterH));
    }
  };

  const makeRun = (code: string, resinId: number | null, chamber: string, notes: string) => {
    const lot = resinId === null ? undefined : lotFor(resinId);
    const row = tx
      .insert(runs)
      .values({ code, chamber, resinLotId: lot?.id ?? null, altitudeM, notes: `${notes} ${DEMO_NOTE}`, createdBy: tech })
      .returning()
      .get();
    writeAudit(tx, { actorId: tech, action: 'create', entity: 'run', entityId: row.id, after: row, reason: 'demo seed' });
    return row;
  };
  const assign = (runId: number, list: DemoCoupon[]) => {
    for (const c of list) {
      tx.update(coupons).set({ runId }).where(eq(coupons.id, c.id)).run();
      writeAudit(tx, { actorId: tech, action: 'assign-run', entity: 'coupon', entityId: c.id, before: { runId: null }, after: { runId }, reason: 'demo seed' });
    }
  };

  const treated = demo.filter((c) => c.role === 'treated');
  const controls = demo.filter((c) => c.role === 'control');
  const resinIds = [...new Set(treated.map((c) => c.resinId).filter((x): x is number => x !== null))].sort((a, b) => a - b);
  const clearId = resinIds.find((id) => !/dyed/i.test(resinById.get(id)?.name ?? '')) ?? resinIds[0] ?? null;
  const dyedId = resinIds.find((id) => id !== clearId) ?? null;
  const ofResin = (id: number | null) => treated.filter((c) => c.resinId === id);
  const bySpeciesIndex = (list: DemoCoupon[], pick: (i: number) => boolean) => {
    const seen = new Map<number, number>();
    return list.filter((c) => {
      const i = seen.get(c.speciesId) ?? 0;
      seen.set(c.speciesId, i + 1);
      return pick(i);
    });
  };

  const vacuumReadings = (runId: number, startH: number, hours: number) => {
    // The pump pulls down within the first quarter hour and then holds near its best at this altitude.
    const best = 24.1 + 0.2 * rnd();
    reading(runId, 'vacuum', at(startH + 0.25), round(best - 0.6, 1));
    for (let h = 1; h <= hours; h++) reading(runId, 'vacuum', at(startH + h), round(best + 0.1 * normal(), 1));
  };

  /** A run through every stage; hours are counted from the demo's now (negative = in the past). */
  const finishedRun = (code: string, resinId: number, list: DemoCoupon[], startH: number, oven: { set: number; measured: number }) => {
    const run = makeRun(code, resinId, 'Chamber A (10 L, acrylic lid)', 'Full cycle, drained and cured in the shop oven.');
    assign(run.id, list);
    const dryEnd = startH + 24;
    stage(run.id, 'drying', { startedAt: at(startH), endedAt: at(dryEnd), plannedMinutes: 24 * 60, ovenSetC: 103, ovenMeasuredC: 102 });
    for (const c of list) {
      dryingChecks(c, startH, [0, 4, 8, 20, 24]);
      dryRecords(c, dryEnd);
    }
    const vacStart = dryEnd + 1;
    stage(run.id, 'vacuum', { startedAt: at(vacStart), endedAt: at(vacStart + 5), plannedMinutes: 300, bubblingStoppedAt: at(vacStart + 4.5) });
    vacuumReadings(run.id, vacStart, 5);
    const soakEnd = vacStart + 5 + 12;
    stage(run.id, 'soak', { startedAt: at(vacStart + 5), endedAt: at(soakEnd), plannedMinutes: 720 });
    stage(run.id, 'drain', { startedAt: at(soakEnd), endedAt: at(soakEnd + 0.5), plannedMinutes: 30 });
    const cureStart = soakEnd + 1;
    stage(run.id, 'cure', { startedAt: at(cureStart), endedAt: at(cureStart + 3), plannedMinutes: 180, ovenSetC: oven.set, ovenMeasuredC: oven.measured });
    for (const c of list) treat(c, soakEnd + 0.75, cureStart + 5, { afterH: 20 });
  };

  // Run 1: the clear resin, every treated coupon, finished a week ago.
  if (clearId !== null) finishedRun('R26-001', clearId, ofResin(clearId), -24 * 9, { set: 107, measured: 104 });

  if (dyedId !== null) {
    const dyed = ofResin(dyedId);
    // Run 2: half of the dyed-resin coupons (two per species), finished.
    finishedRun(
      'R26-002',
      dyedId,
      bySpeciesIndex(dyed, (i) => i < 2),
      -24 * 5,
      { set: 110, measured: 106 },
    );

    // Run 3: soaking now. Dried and weighed dry; the vacuum ended three hours ago.
    const soaking = bySpeciesIndex(dyed, (i) => i === 2);
    const r3 = makeRun('R26-003', dyedId, 'Chamber B (6 L, glass lid)', 'Overnight soak in progress.');
    assign(r3.id, soaking);
    stage(r3.id, 'drying', { startedAt: at(-32), endedAt: at(-8), plannedMinutes: 24 * 60, ovenSetC: 103, ovenMeasuredC: 101 });
    for (const c of soaking) {
      dryingChecks(c, -32, [0, 4, 8, 20, 24]);
      dryRecords(c, -8);
    }
    stage(r3.id, 'vacuum', { startedAt: at(-7), endedAt: at(-3), plannedMinutes: 240, bubblingStoppedAt: at(-3.5) });
    vacuumReadings(r3.id, -7, 4);
    stage(r3.id, 'soak', { startedAt: at(-3), plannedMinutes: 720 });

    // Run 4: drying now; two drying checks so far, not yet at constant mass, no dry weighing yet.
    const drying = bySpeciesIndex(dyed, (i) => i >= 3);
    const r4 = makeRun('R26-004', dyedId, 'Chamber A (10 L, acrylic lid)', 'Blanks in the drying oven.');
    assign(r4.id, drying);
    stage(r4.id, 'drying', { startedAt: at(-6), plannedMinutes: 24 * 60, ovenSetC: 103, ovenMeasuredC: 102 });
    for (const c of drying) dryingChecks(c, -6, [0, 4]);
  }

  // Controls: dried with run 1, never treated, then the same short water soak as the treated blanks.
  const ctrlStart = -24 * 9;
  for (const c of controls) {
    const b = blanks.get(c.id)!;
    dryingChecks(c, ctrlStart, [0, 4, 8, 20, 24]);
    dryRecords(c, ctrlStart + 24);
    check(c.id, {
      kind: 'hardness',
      stage: 'dry',
      measuredAt: at(ctrlStart + 25),
      hardnessValue: round(58 + 3 * normal(), 0),
      hardnessScale: 'shore-d',
      method: 'durometer, 3 readings averaged',
    });
    const swell = 1 + (0.04 + 0.02 * rnd()) / 3;
    const when = at(ctrlStart + 24 + 60);
    check(c.id, {
      kind: 'dimension',
      stage: 'wet-test',
      measuredAt: when,
      lengthMm: round(b.dims.lengthMm * (1 + 0.1 * (swell - 1)), 2),
      widthMm: round(b.dims.widthMm * swell ** 1.45, 2),
      thicknessMm: round(b.dims.thicknessMm * swell ** 1.45, 2),
      method: 'calipers after 1 h submerged, 1 h drained',
    });
    weigh(c.id, 'wet-test', b.dryMassG * (1 + b.startMc * Math.exp(-6)) * (1 + 0.18 + 0.05 * rnd()), when);
  }
}
