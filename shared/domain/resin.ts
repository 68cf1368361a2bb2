import { DomainError, requireFinite, requireFiniteArray, requirePositiveDensity, requirePositiveMass, requirePositiveVolume } from './errors';

/**
 * Density of dry cell-wall substance, g/cm³, nearly species-independent. Literature spans about
 * 1.46 (helium displacement) to 1.53; the Wood Handbook uses 1.54 in its maximum-MC equation.
 * Siau, Transport Processes in Wood (1984) ch. 2; Kellogg & Wangaard (1969) Wood and Fiber 1(3)
 * — the range and the 1.54 are from memory, 1.5 is the customary round value.
 */
export const DEFAULT_CELL_WALL_DENSITY = 1.5;

function requireOvenDrySg(ovenDrySg: number, cellWallDensity: number, field: string): void {
  requireFinite(ovenDrySg, field);
  if (ovenDrySg <= 0 || ovenDrySg >= cellWallDensity) {
    throw new DomainError('sg-out-of-range', field, `${field} must be greater than 0 and below the cell-wall density (${cellWallDensity})`);
  }
}

/**
 * Porosity (void-volume fraction) of oven-dry wood, 0–1: φ = 1 − G_od/ρ_cw, G_od = oven-dry mass /
 * oven-dry volume, ρ_cw in g/cm³. Siau, Transport Processes in Wood (1984) ch. 2 (from memory).
 */
export function porosity(ovenDrySg: number, cellWallDensity: number = DEFAULT_CELL_WALL_DENSITY): number {
  requirePositiveDensity(cellWallDensity, 'cellWallDensity');
  requireOvenDrySg(ovenDrySg, cellWallDensity, 'ovenDrySg');
  return 1 - ovenDrySg / cellWallDensity;
}

/**
 * Theoretical maximum weight percent gain if every void fills with resin, %:
 * WPG_max = (1/G_od − 1/ρ_cw)·ρ_resin·100 (= φ·ρ_resin/G_od·100). Densities in g/cm³.
 * Follows from porosity() and weightPercentGain(); no separate published source.
 */
export function maxWeightPercentGain(ovenDrySg: number, resinDensityGcm3: number, cellWallDensity: number = DEFAULT_CELL_WALL_DENSITY): number {
  requirePositiveDensity(resinDensityGcm3, 'resinDensityGcm3');
  requirePositiveDensity(cellWallDensity, 'cellWallDensity');
  requireOvenDrySg(ovenDrySg, cellWallDensity, 'ovenDrySg');
  return (1 / ovenDrySg - 1 / cellWallDensity) * resinDensityGcm3 * 100;
}

/**
 * Weight percent gain, %: WPG = (m_later − m_dry)/m_dry × 100, masses in g. Used both for cured
 * uptake and for wet uptake after a soak. Negative when the piece lost mass (e.g. extractives leached
 * in a water-soak cycle), so it is returned rather than refused. Rowell (ed.), Handbook of Wood
 * Chemistry and Wood Composites, 2nd ed. (2013), chemical-modification chapter; Hill, Wood
 * Modification (2006) — both from memory.
 */
export function weightPercentGain(dryMassG: number, laterMassG: number): number {
  requirePositiveMass(dryMassG, 'dryMassG');
  requirePositiveMass(laterMassG, 'laterMassG');
  return ((laterMassG - dryMassG) / dryMassG) * 100;
}

/**
 * Weight percent gain from resin, %: WPG = (m_later − m_dry)/m_dry × 100 for a soaked or cured piece.
 * Unlike weightPercentGain (which a water soak may make negative), resin only adds mass, so a later
 * mass below the dry mass is a weighing error and is refused rather than shown as a negative gain.
 * Same sources as weightPercentGain.
 */
export function resinWeightPercentGain(dryMassG: number, laterMassG: number): number {
  const wpg = weightPercentGain(dryMassG, laterMassG);
  if (laterMassG < dryMassG) {
    throw new DomainError('mass-below-dry', 'laterMassG', 'laterMassG cannot be below dryMassG: resin only adds mass');
  }
  return wpg;
}

function requireCuredNotBelowDry(dryMassG: number, curedMassG: number): void {
  // Cured resin only adds mass, so a cured blank lighter than the dry blank is a weighing error.
  if (curedMassG < dryMassG) {
    throw new DomainError('mass-below-dry', 'curedMassG', 'curedMassG cannot be below dryMassG');
  }
}

/**
 * Resin loading (retention), kg/m³: (m_cured − m_dry)/V_dry with masses in g and V in cm³
 * (g/cm³ × 1000 = kg/m³). Follows the wood-preservation "retention" convention: mass of
 * treatment per volume of wood treated (from memory).
 */
export function resinLoading(dryMassG: number, curedMassG: number, dryVolumeCm3: number): number {
  requirePositiveMass(dryMassG, 'dryMassG');
  requirePositiveMass(curedMassG, 'curedMassG');
  requirePositiveVolume(dryVolumeCm3, 'dryVolumeCm3');
  requireCuredNotBelowDry(dryMassG, curedMassG);
  return ((curedMassG - dryMassG) / dryVolumeCm3) * 1000;
}

/**
 * Void fill, fraction: volume of cured resin taken up / void volume of the dry piece =
 * ((m_cured − m_dry)/ρ_resin) / (V_dry·φ), φ = 1 − (m_dry/V_dry)/ρ_cw. Masses g, volume cm³,
 * densities g/cm³. Own definition from porosity(). Can exceed 1 when a surface film of resin or
 * swelling of the piece is weighed in; that is reported rather than refused.
 */
export function voidFill(
  dryMassG: number,
  curedMassG: number,
  dryVolumeCm3: number,
  curedResinDensityGcm3: number,
  cellWallDensity: number = DEFAULT_CELL_WALL_DENSITY,
): number {
  requirePositiveMass(dryMassG, 'dryMassG');
  requirePositiveMass(curedMassG, 'curedMassG');
  requirePositiveVolume(dryVolumeCm3, 'dryVolumeCm3');
  requirePositiveDensity(curedResinDensityGcm3, 'curedResinDensityGcm3');
  requirePositiveDensity(cellWallDensity, 'cellWallDensity');
  requireCuredNotBelowDry(dryMassG, curedMassG);
  const ovenDrySg = dryMassG / dryVolumeCm3;
  requireOvenDrySg(ovenDrySg, cellWallDensity, 'dryMassG');
  const voidVolume = dryVolumeCm3 * (1 - ovenDrySg / cellWallDensity);
  const resinVolume = (curedMassG - dryMassG) / curedResinDensityGcm3;
  return resinVolume / voidVolume;
}

/**
 * Cure loss, % of the resin soaked in that did not stay through the cure (drip-out, volatiles):
 * (m_soaked − m_cured)/(m_soaked − m_dry) × 100, masses in g. Own definition.
 */
export function cureLoss(dryMassG: number, soakedMassG: number, curedMassG: number): number {
  requirePositiveMass(dryMassG, 'dryMassG');
  requirePositiveMass(soakedMassG, 'soakedMassG');
  requirePositiveMass(curedMassG, 'curedMassG');
  if (soakedMassG <= dryMassG) {
    throw new DomainError('no-uptake', 'soakedMassG', 'soakedMassG must be above dryMassG for a cure loss to exist');
  }
  requireCuredNotBelowDry(dryMassG, curedMassG);
  if (curedMassG > soakedMassG) {
    throw new DomainError('mass-above-soaked', 'curedMassG', 'curedMassG cannot be above soakedMassG');
  }
  return ((soakedMassG - curedMassG) / (soakedMassG - dryMassG)) * 100;
}

/**
 * Volumetric change, %: (V_after − V_before)/V_before × 100, any one volume unit. Bulking uses the
 * dry volume before and after treatment; swelling uses the dry and the water-soaked volume.
 * Rowell & Ellis (1978) Wood and Fiber 10(2):104–111 (from memory).
 */
export function volumetricChange(volumeBefore: number, volumeAfter: number): number {
  requirePositiveVolume(volumeBefore, 'volumeBefore');
  requirePositiveVolume(volumeAfter, 'volumeAfter');
  return ((volumeAfter - volumeBefore) / volumeBefore) * 100;
}

/**
 * Anti-swell efficiency, %: ASE = (S_control − S_treated)/S_control × 100, S = volumetric swelling %.
 * Rowell & Ellis (1978) Wood and Fiber 10(2):104–111 (from memory). A control that did not swell
 * leaves ASE undefined, so it is refused.
 */
export function antiSwellEfficiency(swellingControlPct: number, swellingTreatedPct: number): number {
  requireFinite(swellingControlPct, 'swellingControlPct');
  requireFinite(swellingTreatedPct, 'swellingTreatedPct');
  if (swellingControlPct <= 0) {
    throw new DomainError('non-positive-value', 'swellingControlPct', 'swellingControlPct must be greater than 0 %');
  }
  return ((swellingControlPct - swellingTreatedPct) / swellingControlPct) * 100;
}

function mean(values: readonly number[]): number {
  let s = 0;
  for (const v of values) s += v;
  return s / values.length;
}

/**
 * Hardness gain, ratio: mean treated hardness / mean control hardness. Both groups must be the same
 * species and the same scale (e.g. Janka lbf or Shore D); the ratio is unitless. Own definition.
 */
export function hardnessGain(treated: readonly number[], control: readonly number[]): number {
  requireFiniteArray(treated, 'treated', 1);
  requireFiniteArray(control, 'control', 1);
  treated.forEach((v, i) => {
    if (v <= 0) throw new DomainError('non-positive-value', 'treated', 'hardness values must be greater than 0', i);
  });
  control.forEach((v, i) => {
    if (v <= 0) throw new DomainError('non-positive-value', 'control', 'hardness values must be greater than 0', i);
  });
  return mean(treated) / mean(control);
}
