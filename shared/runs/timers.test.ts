import { describe, expect, it } from 'vitest';
import { dueItems, soakMinimumEnd } from './timers';

const T = (h: number) => new Date(Date.UTC(2026, 0, 1, h)).toISOString();

describe('what a run waits for', () => {
  it('gives the open stage its planned end and the soak its minimum (2 × vacuum after the vacuum ended)', () => {
    const stages = [
      { stage: 'vacuum' as const, startedAt: T(0), endedAt: T(4), plannedMinutes: 240 },
      { stage: 'soak' as const, startedAt: T(4), endedAt: null, plannedMinutes: 720 },
    ];
    const due = dueItems(stages, new Date(T(6)));
    expect(due.items.map((i) => [i.kind, i.dueAt, i.overdue])).toEqual([
      ['soak-minimum', T(12), false],
      ['stage-end', T(16), false],
    ]);
    expect(due.next?.kind).toBe('soak-minimum');
    expect(dueItems(stages, new Date(T(13))).items[0]).toMatchObject({ kind: 'soak-minimum', overdue: true });
  });

  it('gives a cure its due end and nothing once stages are closed', () => {
    const cure = [{ stage: 'cure' as const, startedAt: T(20), endedAt: null, plannedMinutes: 150 }];
    expect(dueItems(cure, new Date(T(20))).next?.dueAt).toBe(new Date(Date.UTC(2026, 0, 1, 22, 30)).toISOString());
    expect(dueItems([{ stage: 'cure', startedAt: T(20), endedAt: T(23), plannedMinutes: 150 }], new Date(T(24))).next).toBeNull();
    expect(soakMinimumEnd({ stage: 'vacuum', startedAt: T(0), endedAt: null }, undefined)).toBeNull();
  });
});
