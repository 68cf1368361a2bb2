import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { startHarness, type Harness } from '../../testing/harness';
import { auditLog } from '../../db/schema/admin';
import { runStageVersions } from '../../db/schema/runs';

type Agent = Awaited<ReturnType<Harness['signIn']>>;
const HOUR = 3_600_000;
const at = (h: number) => new Date(Date.UTC(2026, 2, 1, 8) + h * HOUR).toISOString();

let h: Harness;
let tech: Agent;
let viewer: Agent;

beforeAll(async () => {
  h = await startHarness();
  tech = await h.signIn('tech@demo.test');
  viewer = await h.signIn('viewer@demo.test');
});
afterAll(async () => {
  await h.close();
});

/** A run at sea level with a finished vacuum (two gauge readings), a finished soak and an open cure at 110 °C. */
async function runWithStages(): Promise<{ id: number; readingIds: number[] }> {
  const run = await tech.post('/api/runs').send({ chamber: 'Correction chamber', altitudeM: 0 });
  expect(run.status, JSON.stringify(run.body)).toBe(201);
  const id = run.body.run.id as number;
  const post = (body: Record<string, unknown>) => tech.post(`/api/runs/${id}/stages`).send(body);
  expect(
    (
      await post({
        stage: 'vacuum',
        startedAt: at(0),
        endedAt: at(4),
        readings: [
          { at: at(1), gaugeValue: 28, gaugeUnit: 'inHg' },
          { at: at(3), gaugeValue: 29, gaugeUnit: 'inHg' },
        ],
      })
    ).status,
  ).toBe(200);
  expect((await post({ stage: 'soak', startedAt: at(4), endedAt: at(13) })).status).toBe(200);
  const cure = await post({ stage: 'cure', startedAt: at(14), ovenSetC: 110, ovenMeasuredC: 104 });
  expect(cure.status, JSON.stringify(cure.body)).toBe(200);
  const vacuum = cure.body.run.stages.find((s: { stage: string }) => s.stage === 'vacuum');
  return { id, readingIds: vacuum.readings.map((r: { id: number }) => r.id) };
}

const stageOf = (run: { stages: { stage: string }[] }, stage: string) =>
  run.stages.find((s) => s.stage === stage) as unknown as Record<string, unknown> & { readings: Record<string, unknown>[] };

describe('recording a stage again does not change what is recorded', () => {
  it('refuses a different start or oven reading with 409 and the way to change it', async () => {
    const { id } = await runWithStages();
    const moved = await tech.post(`/api/runs/${id}/stages`).send({ stage: 'cure', startedAt: at(15) });
    expect(moved.status).toBe(409);
    expect(moved.body.error.fieldErrors.startedAt[0]).toMatch(/correct the stage and give the reason/);
    const hotter = await tech.post(`/api/runs/${id}/stages`).send({ stage: 'cure', startedAt: at(14), ovenMeasuredC: 120 });
    expect(hotter.status).toBe(409);
    expect(Object.keys(hotter.body.error.fieldErrors)).toEqual(['ovenMeasuredC']);
  });

  it('keeps the stored value when a form resends it rounded (0.1 °F, the minute)', async () => {
    const { id } = await runWithStages();
    // 104 °C shown as 219.2 °F and read back: 104.0000000001 or so; a start resent 20 s off.
    const res = await tech
      .post(`/api/runs/${id}/stages`)
      .send({ stage: 'cure', startedAt: new Date(Date.parse(at(14)) + 20_000).toISOString(), ovenMeasuredC: ((219.2 - 32) * 5) / 9, endedAt: at(17) });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const cure = stageOf(res.body.run, 'cure');
    expect(cure.startedAt).toBe(at(14));
    expect(cure.ovenMeasuredC).toBe(104);
    expect(cure.endedAt).toBe(at(17));
  });
});

describe('correcting a recorded stage', () => {
  it('changes times, a temperature and readings with a reason, keeps the replaced version, and audits it', async () => {
    const { id, readingIds } = await runWithStages();
    const res = await tech.post(`/api/runs/${id}/stages/vacuum/corrections`).send({
      endedAt: at(3.5),
      readings: [
        { id: readingIds[0], gaugeValue: 27.5 },
        { id: readingIds[1], remove: true },
      ],
      addReadings: [{ at: at(3.25), gaugeValue: 28.9, gaugeUnit: 'inHg' }],
      reason: 'End time and first reading copied wrongly from the paper log',
    });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const vacuum = stageOf(res.body.run, 'vacuum');
    expect(vacuum.endedAt).toBe(at(3.5));
    expect(vacuum.readings.map((r) => r.gaugeValue)).toEqual([27.5, 28.9]);
    // Absolute pressure follows the corrected reading: sea level 101.325 kPa − 27.5 inHg.
    expect(vacuum.readings[0]?.absoluteKpa).toBeCloseTo(101.325 - 27.5 * 3.386389, 6);

    const versions = h.database.db.select().from(runStageVersions).where(eq(runStageVersions.runId, id)).all();
    expect(versions).toHaveLength(1);
    expect(versions[0]).toMatchObject({ stage: 'vacuum', reason: 'End time and first reading copied wrongly from the paper log' });
    expect(versions[0]?.values).toMatchObject({ startedAt: at(0), endedAt: at(4) });
    expect(versions[0]?.readings.map((r) => r.gaugeValue)).toEqual([28, 29]);

    const audit = h.database.db
      .select()
      .from(auditLog)
      .where(eq(auditLog.action, 'correct'))
      .all()
      .filter((a) => a.entity === 'run_stage');
    expect(audit.at(-1)).toMatchObject({ reason: 'End time and first reading copied wrongly from the paper log' });

    const history = await viewer.get(`/api/runs/${id}/history`);
    expect(history.status).toBe(200);
    expect(history.body.entries[0]).toMatchObject({
      action: 'correct',
      stage: 'vacuum',
      actorName: expect.any(String),
      reason: expect.stringContaining('paper log'),
    });
    expect(history.body.versions[0]).toMatchObject({ stage: 'vacuum', reason: expect.stringContaining('paper log') });
    // Newest first.
    const ids = history.body.entries.map((e: { id: number }) => e.id);
    expect([...ids].sort((a, b) => b - a)).toEqual(ids);
  });

  it('corrects an oven temperature of the cure, and clears one', async () => {
    const { id } = await runWithStages();
    const res = await tech.post(`/api/runs/${id}/stages/cure/corrections`).send({ ovenMeasuredC: 107.5, ovenSetC: null, reason: 'Thermometer read again' });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(stageOf(res.body.run, 'cure')).toMatchObject({ ovenMeasuredC: 107.5, ovenSetC: null });
  });

  it('checks the corrected times against the neighbouring stages', async () => {
    const { id } = await runWithStages();
    const late = await tech.post(`/api/runs/${id}/stages/vacuum/corrections`).send({ endedAt: at(5), reason: 'Wrong end' });
    expect(late.status).toBe(409);
    expect(late.body.error.fieldErrors.endedAt[0]).toMatch(/soak stage started/);
    const backwards = await tech.post(`/api/runs/${id}/stages/soak/corrections`).send({ endedAt: at(3), reason: 'Wrong end' });
    expect(backwards.status).toBe(422);
    expect(h.database.db.select().from(runStageVersions).where(eq(runStageVersions.runId, id)).all()).toHaveLength(0);
  });

  it('needs a reason and a change; refuses values of another stage and readings of another stage, naming the field', async () => {
    const { id, readingIds } = await runWithStages();
    const noReason = await tech.post(`/api/runs/${id}/stages/cure/corrections`).send({ ovenSetC: 111 });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fieldErrors.reason).toBeTruthy();
    const same = await tech.post(`/api/runs/${id}/stages/cure/corrections`).send({ ovenSetC: 110, reason: 'No change really' });
    expect(same.status).toBe(400);
    const oven = await tech.post(`/api/runs/${id}/stages/soak/corrections`).send({ ovenSetC: 100, reason: 'Oven on the soak?' });
    expect(oven.status).toBe(400);
    expect(Object.keys(oven.body.error.fieldErrors)).toEqual(['ovenSetC']);
    const other = await tech.post(`/api/runs/${id}/stages/cure/corrections`).send({ readings: [{ id: readingIds[0], gaugeValue: 20 }], reason: 'Wrong stage' });
    expect(other.status).toBe(422);
    expect(Object.keys(other.body.error.fieldErrors)).toEqual(['readings.0.id']);
    const missing = await tech.post(`/api/runs/${id}/stages/drain/corrections`).send({ notes: 'x', reason: 'No drain recorded' });
    expect(missing.status).toBe(404);
  });

  it('is for technicians and above; viewers read the history', async () => {
    const { id } = await runWithStages();
    expect((await viewer.post(`/api/runs/${id}/stages/cure/corrections`).send({ ovenSetC: 111, reason: 'Not allowed' })).status).toBe(403);
    expect((await viewer.get(`/api/runs/${id}/history`)).status).toBe(200);
    expect((await viewer.get('/api/runs/999999/history')).status).toBe(404);
  });
});
