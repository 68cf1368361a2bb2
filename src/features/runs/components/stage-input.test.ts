import { describe, expect, it } from 'vitest';
import { recordStageSchema } from '../../../../shared/schemas/runs';
import { unitsFor } from '../../../lib/use-units';
import { toStageInput, type StageFormValues } from './stage-form';

const blank: StageFormValues = {
  startedAt: '2026-03-14T09:00',
  endedAt: '2026-03-14T15:30',
  plannedHours: null,
  plannedMins: null,
  bubblingStoppedAt: '',
  ovenSetC: null,
  ovenMeasuredC: null,
  notes: '  ',
  readings: [],
};
const metric = unitsFor('metric');
const us = unitsFor('us');

describe('stage form → recordStage contract', () => {
  it('starts a vacuum with hours and minutes as minutes, blank gauge rows left out', () => {
    const input = toStageInput(
      {
        ...blank,
        plannedHours: 4,
        plannedMins: 30,
        readings: [
          { at: '2026-03-14T09:10', gaugeValue: 28.5, gaugeUnit: 'inHg' },
          { at: '2026-03-14T09:20', gaugeValue: null, gaugeUnit: 'inHg' },
        ],
      },
      { stage: 'vacuum', mode: 'start', end: false, units: metric },
    );
    expect(input).toMatchObject({ stage: 'vacuum', plannedMinutes: 270, notes: null, bubblingStoppedAt: null });
    expect(input.startedAt).toBe(new Date(2026, 2, 14, 9, 0).toISOString());
    expect(input.readings).toEqual([{ at: new Date(2026, 2, 14, 9, 10).toISOString(), gaugeValue: 28.5, gaugeUnit: 'inHg' }]);
    expect(input).not.toHaveProperty('endedAt');
    expect(recordStageSchema.safeParse(input).success).toBe(true);
  });

  it('ends an open cure keeping its recorded start, oven temperatures from °F to °C', () => {
    const existing = { startedAt: '2026-03-14T08:59:41.000Z' };
    const input = toStageInput({ ...blank, ovenSetC: 212, ovenMeasuredC: 203 }, { stage: 'cure', mode: 'open', existing, end: true, units: us });
    expect(input.startedAt).toBe(existing.startedAt);
    expect(input.endedAt).toBe(new Date(2026, 2, 14, 15, 30).toISOString());
    expect(input.ovenSetC).toBeCloseTo(100, 10); // 212 °F is 100 °C by definition of the scales
    expect(input.ovenMeasuredC).toBeCloseTo(95, 10);
    expect(input.plannedMinutes).toBeNull();
    expect(recordStageSchema.safeParse(input).success).toBe(true);
  });

  it('keeps a number box that is not a number as NaN so the resolver names it', () => {
    const input = toStageInput({ ...blank, ovenSetC: Number.NaN }, { stage: 'drying', mode: 'start', end: false, units: metric });
    expect(input.ovenSetC).toBeNaN();
  });
});
