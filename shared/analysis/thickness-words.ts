import type { Fit } from '../schemas/analysis';
import { fmt } from './stats';

/**
 * The server words its thickness fits per millimetre, the unit thickness is stored in. A reader who
 * measures in inches (or centimetres) gets the same fits re-worded per a step of their own unit: the
 * slope per mm times the step's length in mm. Only the words and the coefficient's unit change; the
 * numbers are the same fit. Pure, so the client can re-word without asking the server again.
 */
export interface LengthWords {
  /** The unit's label: "in", "cm". */
  label: string;
  /** Millimetres in one of the unit (25.4 for the inch). */
  mmPer: number;
}

/** The step a sentence speaks in: 0.1 in or 0.1 cm (about the size of 1 mm), 1 of anything smaller. */
export function thicknessStep(unit: LengthWords): number {
  return unit.mmPer >= 10 ? 0.1 : 1;
}

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;
const direction = (v: number, up: string, down: string) => (v >= 0 ? up : down);
function ciText(lo: number, hi: number, scale: number, digits: number): string {
  const a = lo * scale;
  const b = hi * scale;
  return `95 % CI ${fmt(Math.min(a, b), digits)} to ${fmt(Math.max(a, b), digits)}`;
}

const isThickness = (name: string) => name.startsWith('thickness');

/** The coefficients with the thickness slope per one of the unit (its SE and CI alike), renamed. */
function coefficientsIn(fit: Fit, unit: LengthWords): Fit['coefficients'] {
  return fit.coefficients.map((c) =>
    isThickness(c.name)
      ? { name: `thickness (${unit.label})`, estimate: c.estimate * unit.mmPer, se: c.se * unit.mmPer, ci95: [c.ci95[0] * unit.mmPer, c.ci95[1] * unit.mmPer] }
      : c,
  );
}

/**
 * A fit that speaks of thickness (the WPG–thickness line, or SG and thickness together), re-worded in
 * the reader's length unit. Other fits come back unchanged.
 */
export function fitInLength(fit: Fit, unit: LengthWords): Fit {
  const thickness = fit.coefficients.find((c) => isThickness(c.name));
  if (!thickness || unit.mmPer === 1) return fit;
  const step = thicknessStep(unit);
  const stepMm = step * unit.mmPer;
  const stepWords = `${step} ${unit.label}`;
  const coefficients = coefficientsIn(fit, unit);
  if (fit.model === 'thickness') {
    const change = thickness.estimate * stepMm;
    const sentence =
      `Across ${plural(fit.n, 'coupon')}, WPG ${direction(change, 'rises', 'falls')} by about ${fmt(Math.abs(change))} points for each ${stepWords} of extra thickness ` +
      `(${ciText(thickness.ci95[0], thickness.ci95[1], stepMm, 1)}); the line accounts for ${fmt(fit.r2 * 100, 0)} % of the spread (R² = ${fmt(fit.r2, 2)}) ` +
      `and coupons scatter about ±${fmt(fit.residualSd)} points around it (residual SD). The shaded band is the 95 % confidence band of the mean line.`;
    return { ...fit, coefficients, sentence };
  }
  const sg = fit.coefficients.find((c) => c.name === 'SG');
  if (!sg) return { ...fit, coefficients };
  const sentence =
    `At equal thickness, each 0.1 of SG ${direction(sg.estimate, 'raises', 'lowers')} uptake by about ${fmt(Math.abs(sg.estimate * 0.1))} points ` +
    `(${ciText(sg.ci95[0], sg.ci95[1], 0.1, 1)}); at equal SG, each ${stepWords} of thickness ${direction(thickness.estimate, 'raises', 'lowers')} it by about ` +
    `${fmt(Math.abs(thickness.estimate * stepMm), 2)} points (${ciText(thickness.ci95[0], thickness.ci95[1], stepMm, 2)}). Together they account for ${fmt(fit.r2 * 100, 0)} % of the spread ` +
    `(R² = ${fmt(fit.r2, 2)}, residual SD ${fmt(fit.residualSd)} points, ${plural(fit.n, 'coupon')}).`;
  return { ...fit, coefficients, sentence };
}
