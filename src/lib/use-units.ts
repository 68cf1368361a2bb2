import { useQuery } from '@tanstack/react-query';
import { useMemo } from 'react';
import {
  displayUnit,
  formatQuantity,
  fromDisplay,
  presetOf,
  toDisplay,
  unitPrefs,
  type EnteredPrecision,
  type Quantity,
  type UnitChoice,
  type UnitPrefs,
  type UnitSystem,
} from '../../shared/units';
import { HARDNESS_SCALE_LABELS, type HardnessScale } from '../../shared/constants/records';
import { meQuery } from './session';

/** Formatting and parsing in the user's display units, chosen per quantity; values in and out are SI as stored. */
export function useUnits() {
  // `select`: a component re-renders when the unit choice changes, not when anything else about the user
  // does (structural sharing keeps the same object while the choice is unchanged).
  const prefs = useQuery({ ...meQuery(), select: (u) => u?.units ?? null }).data ?? null;
  return useMemo(() => unitsFor(prefs ?? 'metric'), [prefs]);
}

export interface FormatOptions {
  /** How the value was typed (unit and decimals): the display keeps that precision. */
  entered?: EnteredPrecision | null;
  /** Fixed decimals instead, e.g. to show a correction's size. */
  decimals?: number;
}

export function unitsFor(choice: UnitChoice) {
  const prefs: UnitPrefs = unitPrefs(choice);
  /** The preset the choice equals, or null when it mixes units. */
  const system: UnitSystem | null = presetOf(prefs);
  return {
    prefs,
    system,
    unit: <Q extends Quantity>(q: Q) => prefs[q],
    label: (q: Quantity) => displayUnit(q, prefs).label,
    /** Default decimals of the chosen unit. */
    decimals: (q: Quantity) => displayUnit(q, prefs).decimals,
    /** SI value → display number as text, with the unit's label unless `withUnit` is false; "—" when missing. */
    format(value: number | null | undefined, q: Quantity, withUnit = true, options: FormatOptions = {}): string {
      return formatQuantity(value, q, prefs, { ...options, withUnit });
    },
    /**
     * A hardness reading with its scale. Janka is a force (stored in N) and follows the force unit;
     * Shore D and Brinell are scales, shown as measured and never converted into one another.
     */
    hardness(value: number | null | undefined, scale: HardnessScale): string {
      if (value === null || value === undefined || !Number.isFinite(value)) return '—';
      if (scale === 'janka-n') return `${formatQuantity(value, 'force', prefs)} Janka`;
      return `${value} ${HARDNESS_SCALE_LABELS[scale]}`;
    },
    toDisplay: (value: number, q: Quantity) => toDisplay(value, q, prefs),
    fromDisplay: (value: number, q: Quantity) => fromDisplay(value, q, prefs),
  };
}

export type Units = ReturnType<typeof unitsFor>;
