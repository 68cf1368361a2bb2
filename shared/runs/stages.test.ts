import { describe, expect, it } from 'vitest';
import { checkStage, runProgress, startableStages, stageMinutes, type StageTimes } from './stages';

const s = (stage: StageTimes['stage'], startedAt: string, endedAt: string | null = null): StageTimes => ({ stage, startedAt, endedAt });
const T = (h: number) => new Date(Date.UTC(2026, 0, 1, h)).toISOString();

describe('run stage machine', () => {
  it('starts with drying or vacuum; soak, drain and cure need the vacuum first', () => {
    expect(startableStages([], T(0))).toEqual(['drying', 'vacuum']);
    expect(checkStage([], { stage: 'cure', startedAt: T(0), endedAt: null })).toMatchObject({ ok: false, field: 'stage' });
  });

  it('refuses a cure before a soak has started', () => {
    const d = checkStage([s('vacuum', T(0), T(4))], { stage: 'cure', startedAt: T(5), endedAt: null });
    expect(d.ok).toBe(false);
    if (!d.ok) expect(d.reason).toMatch(/soak/);
  });

  it('needs the previous stage ended before the next one starts, and not before it ended', () => {
    const open = checkStage([s('vacuum', T(0))], { stage: 'soak', startedAt: T(4), endedAt: null });
    expect(open).toMatchObject({ ok: false });
    if (!open.ok) expect(open.reason).toMatch(/End the vacuum/);
    const early = checkStage([s('vacuum', T(0), T(4))], { stage: 'soak', startedAt: T(3), endedAt: null });
    expect(early).toMatchObject({ ok: false, field: 'startedAt' });
    expect(checkStage([s('vacuum', T(0), T(4))], { stage: 'soak', startedAt: T(4), endedAt: null })).toEqual({ ok: true });
  });

  it('lets draining be skipped but never goes back to an earlier stage', () => {
    const rec = [s('vacuum', T(0), T(4)), s('soak', T(4), T(12))];
    expect(startableStages(rec, T(13))).toEqual(['drain', 'cure']);
    const back = checkStage([...rec, s('cure', T(13))], { stage: 'drying', startedAt: T(14), endedAt: null });
    expect(back).toMatchObject({ ok: false, field: 'stage' });
  });

  it('marks an end before the start as impossible, and keeps an edit consistent with the next stage', () => {
    expect(checkStage([], { stage: 'vacuum', startedAt: T(4), endedAt: T(3) })).toMatchObject({ ok: false, field: 'endedAt', impossible: true });
    const rec = [s('vacuum', T(0), T(4)), s('soak', T(4))];
    expect(checkStage(rec, { stage: 'vacuum', startedAt: T(0), endedAt: T(5) })).toMatchObject({ ok: false, field: 'endedAt' });
    expect(checkStage(rec, { stage: 'vacuum', startedAt: T(0), endedAt: null })).toMatchObject({ ok: false, field: 'endedAt' });
    expect(checkStage(rec, { stage: 'vacuum', startedAt: T(0), endedAt: T(3) })).toEqual({ ok: true });
  });

  it('reports progress and durations', () => {
    expect(runProgress([])).toEqual({ current: null, currentOpen: false, status: 'planned' });
    expect(runProgress([s('vacuum', T(0), T(4)), s('soak', T(4))])).toEqual({ current: 'soak', currentOpen: true, status: 'in-progress' });
    expect(runProgress([s('vacuum', T(0), T(4)), s('soak', T(4), T(12)), s('cure', T(13), T(16))]).status).toBe('finished');
    expect(stageMinutes(s('vacuum', T(0), T(4)))).toBe(240);
    expect(stageMinutes(s('vacuum', T(0)))).toBeNull();
  });
});
