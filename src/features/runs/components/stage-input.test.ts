import { describe, expect, it } from 'vitest';
import { recordStageSchema } from '../../../../shared/schemas/runs';
import { unitsFor } from '../../../lib/use-units';
import { ambientText, readingPreviewText, toStageInput, type StageFormValues } from './stage-form';

const blank: StageFormValues = {
  startedAt: '2026-03-14T09:00',
  endedAt: '2026-03-14T15:30',
  plannedHours: null,
  plannedMins: null,
  bubblingStoppedAt: '',
  barometer: null,
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

describe("the vacuum stage's ambient: the shop's barometer or the standard atmosphere", () => {
  const KPA_PER_INHG = 3.386389; // NIST SP 811 (2008), App. B

  it('sends the barometer in kPa whatever unit it was typed in, and only for the vacuum stage', () => {
    const input = toStageInput({ ...blank, barometer: 30.1 }, { stage: 'vacuum', mode: 'start', end: false, units: us });
    expect(input.barometerKpa).toBeCloseTo(30.1 * KPA_PER_INHG, 10);
    expect(recordStageSchema.safeParse(input).success).toBe(true);
    expect(toStageInput({ ...blank, barometer: null }, { stage: 'vacuum', mode: 'start', end: false, units: metric }).barometerKpa).toBeNull();
    expect(toStageInput({ ...blank, barometer: 101 }, { stage: 'soak', mode: 'start', end: false, units: metric })).not.toHaveProperty('barometerKpa');
    // 30.1 typed in a kPa box is inHg by mistake: the contract names the box.
    const slip = recordStageSchema.safeParse(toStageInput({ ...blank, barometer: 30.1 }, { stage: 'vacuum', mode: 'start', end: false, units: metric }));
    expect(slip.success).toBe(false);
    expect(slip.error?.issues[0]?.path).toEqual(['barometerKpa']);
  });

  it('names the standard atmosphere at the altitude in the user units, and the weather allowance', () => {
    // ISO 2533 / U.S. Standard Atmosphere 1976 tabulate 89.876 kPa at 1,000 m geopotential; 1,000 m on a map
    // is 999.84 m geopotential, 0.002 kPa higher: 89.88 kPa to two decimals.
    const m = ambientText(null, 1000, metric);
    expect(m).toMatch(/ISO 2533 standard atmosphere at 1000 m, 89\.88 kPa/);
    expect(m).toMatch(/up to 5 % more vacuum .* taken as 0/);
    // U.S. Standard Atmosphere 1976 at 1,500 ft (457.2 m geometric, 457.17 m geopotential): 95.95 kPa, between
    // the table's 95.461 kPa at 500 m and 101.325 kPa at 0 m; = 28.33 inHg (NIST SP 811 factor).
    expect(ambientText(null, 457.2, us)).toMatch(/at 1500 ft, 28\.33 inHg/);
  });

  it('names the barometer when the shop has one, and says when a reading was taken as 0 absolute', () => {
    expect(ambientText(102.5, 0, metric)).toMatch(/the shop's barometer, 102\.50 kPa/);
    // 30.0 inHg = 101.59 kPa: against the sea-level standard 101.325 kPa (USSA 1976) it is within 5 % beyond → clamped.
    const clamped = readingPreviewText(30.0, 'inHg', { altitudeM: 0, barometerKpa: null }, metric);
    expect(clamped).toEqual({
      text: expect.stringMatching(/= 0 absolute, 100 % vacuum: more vacuum than the standard atmosphere \(101\.33 kPa\), within the weather allowance/),
      problem: false,
    });
    // Against a 102.5 kPa barometer the same reading is 102.5 − 101.59 = 0.91 kPa absolute (by hand).
    const withBarometer = readingPreviewText(30.0, 'inHg', { altitudeM: 0, barometerKpa: 102.5 }, metric);
    expect(withBarometer?.text).toMatch(/= 0\.9\d* kPa absolute, 99\.1 % vacuum against the barometer/);
    // 27 inHg at 1600 m is beyond the allowance of the standard ambient (≈ 83.5 kPa, USSA 1976): a unit slip.
    expect(readingPreviewText(27, 'inHg', { altitudeM: 1600, barometerKpa: null }, metric)).toMatchObject({ problem: true });
    expect(readingPreviewText(27, 'inHg', { altitudeM: 1600, barometerKpa: 20 }, metric)?.text).toMatch(/barometer reading is not a plausible/);
  });
});
