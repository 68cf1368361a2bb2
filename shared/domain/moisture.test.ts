import { describe, expect, it } from 'vitest';
import { readReferenceCsv } from '../../tests/reference/read-reference';
import { convertTemperature } from '../units';
import { basicSpecificGravity, densityAtMoisture, equilibriumMoistureContent, maxMoistureContent, moistureContent, specificGravityAtMoisture } from './index';

describe('moistureContent (oven-dry basis)', () => {
  // [mass g, oven-dry mass g, MC %, source]
  const rows: [number, number, number, string][] = [
    [112, 100, 12, 'definition, Wood Handbook FPL-GTR-282 ch. 4 eq. 4-2 / ASTM D4442; by hand'],
    [100, 100, 0, 'same definition; oven-dry itself'],
    [250, 100, 150, 'same definition; green wood above 100 % MC is normal'],
    [48.6, 45, 8, 'same definition; by hand 3.6/45'],
  ];
  it.each(rows)('%d g over %d g oven-dry → %d pct  (%s)', (m, od, mc) => {
    expect(moistureContent(m, od)).toBeCloseTo(mc, 12);
  });
});

describe('specificGravityAtMoisture / basicSpecificGravity / densityAtMoisture', () => {
  // Worked values computed by hand from the handbook equation G_M = G_b/(1 − 0.265·a·G_b), a = (30 − M)/30.
  // [basic SG, MC %, G_M, density kg/m³ or null, source]
  const rows: [number, number, number, number | null, string][] = [
    [0.56, 12, 0.6147, 688.5, 'Wood Handbook FPL-GTR-190 ch. 4 SG equation; by hand 0.56/0.91096, ×1.12×1000'],
    [0.56, 0, 0.6576, 657.6, 'same equation at oven-dry, a = 1; by hand 0.56/0.8516'],
    [0.38, 12, 0.4044, 452.9, 'same equation; by hand 0.38/0.93958'],
    [0.32, 12, 0.3372, 377.6, 'same equation; by hand 0.32/0.94912'],
    [0.5, 30, 0.5, 650, 'at the fiber saturation point (30 %) G_M = G_b, Wood Handbook ch. 4'],
    [0.5, 80, 0.5, 900, 'above FSP the volume stays green, so G_M = G_b; density 1000·0.5·1.8'],
  ];
  it.each(rows)('G_b %d at %d pct MC → G_M %d  (%s)', (gb, m, gm, rho) => {
    expect(specificGravityAtMoisture(gb, m)).toBeCloseTo(gm, 4);
    if (rho !== null) expect(densityAtMoisture(gb, m)).toBeCloseTo(rho, 0);
    // basicSpecificGravity inverts the same equation (Wood Handbook ch. 4)
    expect(basicSpecificGravity(specificGravityAtMoisture(gb, m), m)).toBeCloseTo(gb, 12);
  });

  it('the density row at 12 % matches to 0.05 kg/m³ (Wood Handbook ch. 4 density equation, by hand 688.5)', () => {
    expect(Math.abs(densityAtMoisture(0.56, 12) - 688.5)).toBeLessThan(0.05);
  });

  // Wood Handbook FPL-GTR-190 Table 5-3a: tabulated 12 % SG are measured per species, while the equation uses an
  // average shrinkage; the table and equation differ by up to 0.033 (basswood). Stated tolerance: ±0.035 SG.
  const table53 = readReferenceCsv('./wood-handbook-sg-green-12pct.csv');
  it.each(table53.map((r) => [r.common_name, Number(r.sg_green), Number(r.sg_12pct), r.provenance_sg] as const))(
    '%s: green SG %d → 12 pct SG near the tabulated %d (Wood Handbook Table 5-3, provenance %s)',
    (_name, green, at12) => {
      expect(Math.abs(specificGravityAtMoisture(green, 12) - at12)).toBeLessThanOrEqual(0.035);
    },
  );
});

describe('equilibriumMoistureContent (Wood Handbook ch. 4 eq. 4-5, Table 4-2)', () => {
  const rows = readReferenceCsv('./emc-table-4-2-points.csv');
  it.each(rows.map((r) => [Number(r.temp_F), Number(r.rh_pct), Number(r.emc_table_pct), Number(r.emc_eq_computed_pct)] as const))(
    '%d °F, %d pct RH → Table 4-2 %d (within 0.06), eq. 4-5 %d (within 0.0006)',
    (tF, rh, table, eq) => {
      const emc = equilibriumMoistureContent(convertTemperature(tF, 'degF', 'degC'), rh);
      expect(Math.abs(emc - table)).toBeLessThanOrEqual(0.06);
      expect(Math.abs(emc - eq)).toBeLessThanOrEqual(0.0006);
    },
  );

  it('dry air holds no moisture in the wood: RH 0 → EMC 0 (eq. 4-5 at h = 0)', () => {
    expect(equilibriumMoistureContent(20, 0)).toBe(0);
  });

  it('accepts the rounded °C edges of the table, −1.1 °C and 132.2 °C (Table 4-2 range 30–270 °F)', () => {
    expect(equilibriumMoistureContent(-1.1, 50)).toBeGreaterThan(0);
    expect(equilibriumMoistureContent(132.2, 50)).toBeGreaterThan(0);
  });
});

describe('impossible wood is refused, not computed', () => {
  // M_max = 100·(1.54 − G_b)/(1.54·G_b), Wood Handbook ch. 4 maximum moisture content (equation from memory);
  // by hand for G_b 0.5: 100·1.04/0.77 = 135.06 %.
  it('maxMoistureContent(0.5) = 135.06 % (by hand from the handbook equation)', () => {
    expect(maxMoistureContent(0.5)).toBeCloseTo(135.065, 3);
  });

  it("densityAtMoisture and specificGravityAtMoisture refuse a moisture content above the wood's maximum (G_b 0.5 at 136 %)", () => {
    expect(densityAtMoisture(0.5, 135)).toBeCloseTo(1000 * 0.5 * 2.35, 6);
    expect(() => densityAtMoisture(0.5, 136)).toThrow(expect.objectContaining({ code: 'moisture-out-of-range', field: 'moisturePct' }));
    expect(() => specificGravityAtMoisture(0.5, 136)).toThrow(expect.objectContaining({ code: 'moisture-out-of-range' }));
  });

  it('refuses a basic SG whose oven-dry SG would pass the cell-wall density (G_b 1.2 → G_0 = 1.2/(1 − 0.318) = 1.76)', () => {
    expect(() => specificGravityAtMoisture(1.2, 12)).toThrow(expect.objectContaining({ code: 'sg-out-of-range', field: 'basicSg' }));
    expect(() => basicSpecificGravity(1.45, 12)).toThrow(expect.objectContaining({ code: 'sg-out-of-range', field: 'sgAtMoisture' }));
    // The densest woods of the handbook's tables (about 1.05 basic) still pass: 1.05/(1 − 0.278) = 1.45.
    expect(specificGravityAtMoisture(1.05, 0)).toBeCloseTo(1.4547, 3);
  });
});
