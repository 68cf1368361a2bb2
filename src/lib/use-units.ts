import { useQuery } from '@tanstack/react-query';
import { useMemo } from 'react';
import { displayUnit, fromDisplay, toDisplay, type Quantity, type UnitSystem } from '../../shared/units';
import { meQuery } from './session';

/** Formatting and parsing in the user's display units; values in and out are SI as stored. */
export function useUnits() {
  // `select`: a component re-renders when the unit system changes, not when anything else about the user does.
  const system: UnitSystem = useQuery({ ...meQuery(), select: (u) => u?.unitSystem ?? 'metric' }).data ?? 'metric';
  return useMemo(() => unitsFor(system), [system]);
}

export function unitsFor(system: UnitSystem) {
  return {
    system,
    label: (q: Quantity) => displayUnit(q, system).label,
    /** SI value → display number (rounded to the unit's usual decimals) as text. */
    format(value: number | null | undefined, q: Quantity, withUnit = true): string {
      if (value === null || value === undefined || !Number.isFinite(value)) return '—';
      const d = displayUnit(q, system);
      const n = toDisplay(value, q, system).toFixed(d.decimals);
      return withUnit ? `${n} ${d.label}` : n;
    },
    toDisplay: (value: number, q: Quantity) => toDisplay(value, q, system),
    fromDisplay: (value: number, q: Quantity) => fromDisplay(value, q, system),
  };
}
