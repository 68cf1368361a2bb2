import { DomainError, requireFinite, requirePositiveMass } from './errors';

/**
 * Fiber saturation point used by the Wood Handbook for the SG adjustment (about 30 % MC;
 * species range roughly 25–35 %). Wood Handbook FPL-GTR-190 ch. 4, "Fiber saturation point".
 */
export const FIBER_SATURATION_PCT = 30;

/**
 * Upper bound for any specific gravity we accept: no wood is denser than its own cell-wall
 * substance (≈ 1.5, see DEFAULT_CELL_WALL_DENSITY in resin.ts).
 */
const MAX_WOOD_SG = 1.5;

function requireSg(value: number, field: string): number {
  requireFinite(value, field);
  if (value <= 0 || value >= MAX_WOOD_SG) {
    throw new DomainError('sg-out-of-range', field, `${field} must be between 0 and ${MAX_WOOD_SG}`);
  }
  return value;
}

function requireMoisture(value: number, field: string): number {
  requireFinite(value, field);
  if (value < 0) throw new DomainError('moisture-out-of-range', field, `${field} cannot be below 0 %`);
  return value;
}

/**
 * Moisture content on the oven-dry basis, %: MC = (m − m_od) / m_od × 100.
 * Masses in g. Wood Handbook FPL-GTR-282 ch. 4 eq. 4-2; ASTM D4442.
 * A mass below the oven-dry mass is refused: oven-dry is by definition the lowest mass.
 */
export function moistureContent(massG: number, ovenDryMassG: number): number {
  requirePositiveMass(massG, 'massG');
  requirePositiveMass(ovenDryMassG, 'ovenDryMassG');
  if (massG < ovenDryMassG) {
    throw new DomainError('mass-below-dry', 'massG', 'massG cannot be below the oven-dry mass');
  }
  return ((massG - ovenDryMassG) / ovenDryMassG) * 100;
}

/**
 * Specific gravity of the cell-wall substance in the handbook's maximum-moisture equation (1.54; the
 * resin functions use the customary round 1.5, see DEFAULT_CELL_WALL_DENSITY). Wood Handbook ch. 4
 * (from memory).
 */
const HANDBOOK_CELL_WALL_SG = 1.54;

/**
 * Maximum moisture content, %: all cell walls saturated and every void full of water,
 * M_max = 100·(1.54 − G_b)/(1.54·G_b), G_b basic SG. Wood Handbook FPL-GTR-190 ch. 4, "maximum moisture
 * content" (equation from memory). A moisture content above it is impossible for that wood.
 */
export function maxMoistureContent(basicSg: number): number {
  requireSg(basicSg, 'basicSg');
  return (100 * (HANDBOOK_CELL_WALL_SG - basicSg)) / (HANDBOOK_CELL_WALL_SG * basicSg);
}

function requireAtMostMax(moisturePct: number, basicSg: number): void {
  const max = maxMoistureContent(basicSg);
  if (moisturePct > max) {
    throw new DomainError(
      'moisture-out-of-range',
      'moisturePct',
      `moisturePct ${moisturePct} % is above the most water wood of basic SG ${basicSg} can hold (${max.toFixed(1)} %, every void full)`,
    );
  }
}

/** Oven-dry SG (oven-dry mass / oven-dry volume) from basic SG: the G_M equation at M = 0. */
function ovenDryFromBasic(basicSg: number): number {
  return basicSg / (1 - 0.265 * basicSg);
}

/** Refuses a basic SG whose oven-dry SG would reach the cell-wall substance's (no voids left). */
function requireBelowCellWall(basicSg: number, field: string): void {
  if (ovenDryFromBasic(basicSg) >= MAX_WOOD_SG) {
    throw new DomainError(
      'sg-out-of-range',
      field,
      `${field} ${basicSg} would make the oven-dry wood as dense as its own cell-wall substance (${MAX_WOOD_SG}); no wood is`,
    );
  }
}

/** a = (FSP − M)/FSP, clamped to 0 at and above the fiber saturation point. */
function belowFspFraction(moisturePct: number): number {
  return moisturePct >= FIBER_SATURATION_PCT ? 0 : (FIBER_SATURATION_PCT - moisturePct) / FIBER_SATURATION_PCT;
}

/**
 * Specific gravity on the volume at moisture content M (oven-dry mass / volume at M) from basic SG
 * (oven-dry mass / green volume): G_M = G_b / (1 − 0.265·a·G_b), a = (30 − M)/30.
 * Valid 0–30 % MC; at or above 30 % the volume is the green volume, so G_M = G_b.
 * Wood Handbook FPL-GTR-190 ch. 4, "Density and specific gravity" (equation number not checked,
 * probably 4-8 — from memory). The 0.265 stands for an average volumetric shrinkage, so single species
 * differ from their tabulated 12 % SG by up to about 0.03. Refuses a basic SG whose oven-dry SG would
 * reach the cell-wall density, and a moisture content above the wood's maximum (maxMoistureContent).
 */
export function specificGravityAtMoisture(basicSg: number, moisturePct: number): number {
  requireSg(basicSg, 'basicSg');
  requireMoisture(moisturePct, 'moisturePct');
  requireBelowCellWall(basicSg, 'basicSg');
  requireAtMostMax(moisturePct, basicSg);
  return basicSg / (1 - 0.265 * belowFspFraction(moisturePct) * basicSg);
}

/**
 * Inverse of specificGravityAtMoisture: G_b = G_M / (1 + 0.265·a·G_M), a = (30 − M)/30.
 * Wood Handbook FPL-GTR-190 ch. 4 (same section).
 */
export function basicSpecificGravity(sgAtMoisture: number, moisturePct: number): number {
  requireSg(sgAtMoisture, 'sgAtMoisture');
  requireMoisture(moisturePct, 'moisturePct');
  const basic = sgAtMoisture / (1 + 0.265 * belowFspFraction(moisturePct) * sgAtMoisture);
  requireBelowCellWall(basic, 'sgAtMoisture');
  requireAtMostMax(moisturePct, basic);
  return basic;
}

/** Density of water used by the handbook for SG → density, kg/m³ (62.4 lb/ft³). */
const WATER_DENSITY_KG_M3 = 1000;

/**
 * Density of wood at moisture content M, kg/m³ (mass and volume both at M):
 * ρ_M = ρ_w · G_M · (1 + M/100), ρ_w = 1000 kg/m³. Wood Handbook FPL-GTR-190 ch. 4,
 * the equation after the SG adjustment.
 */
export function densityAtMoisture(basicSg: number, moisturePct: number): number {
  const gM = specificGravityAtMoisture(basicSg, moisturePct);
  return WATER_DENSITY_KG_M3 * gM * (1 + moisturePct / 100);
}

/** Table 4-2 spans 30–270 °F; the fitted polynomials are not claimed outside it. */
const EMC_MIN_F = 30;
const EMC_MAX_F = 270;

/**
 * Equilibrium moisture content, % (oven-dry basis), from temperature (°C) and relative humidity (%):
 * M = (1800/W)·[Kh/(1 − Kh) + (K₁Kh + 2K₁K₂K²h²)/(1 + K₁Kh + K₁K₂K²h²)], h = RH/100, with T in °F:
 * W = 330 + 0.452T + 0.00415T², K = 0.791 + 4.63e-4·T − 8.44e-7·T²,
 * K₁ = 6.34 + 7.75e-4·T − 9.35e-5·T², K₂ = 1.09 + 0.0284T − 9.04e-5·T².
 * Wood Handbook FPL-GTR-190/282 ch. 4 eq. 4-5 (Simpson 1973, Wood and Fiber 5(1):41–49).
 * The °F coefficients are used because Table 4-2 was computed from them; the handbook's °C set is a
 * refit and differs in the last digit at some points. Valid over the table, 30–270 °F (−1.1 to 132.2 °C).
 */
export function equilibriumMoistureContent(tempC: number, relativeHumidityPct: number): number {
  requireFinite(tempC, 'tempC');
  requireFinite(relativeHumidityPct, 'relativeHumidityPct');
  if (relativeHumidityPct < 0 || relativeHumidityPct > 100) {
    throw new DomainError('rh-out-of-range', 'relativeHumidityPct', 'relativeHumidityPct must be between 0 and 100');
  }
  const t = (tempC * 9) / 5 + 32;
  // The small margin lets the table's rounded °C edges (−1.1 °C, 132.2 °C) through.
  if (t < EMC_MIN_F - 0.1 || t > EMC_MAX_F + 0.1) {
    throw new DomainError('temperature-out-of-range', 'tempC', 'tempC must be within −1.1 to 132.2 °C, the range of the handbook EMC equation');
  }
  const h = relativeHumidityPct / 100;
  const w = 330 + 0.452 * t + 0.00415 * t * t;
  const k = 0.791 + 4.63e-4 * t - 8.44e-7 * t * t;
  const k1 = 6.34 + 7.75e-4 * t - 9.35e-5 * t * t;
  const k2 = 1.09 + 0.0284 * t - 9.04e-5 * t * t;
  const kh = k * h;
  return (1800 / w) * (kh / (1 - kh) + (k1 * kh + 2 * k1 * k2 * kh * kh) / (1 + k1 * kh + k1 * k2 * kh * kh));
}
