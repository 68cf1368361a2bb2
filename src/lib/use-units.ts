import { useQuery } from '@tanstack/react-query';
import { useMemo } from 'react';
import { displayUnit, fromDisplay, toDisplay, type Quantity, type UnitSystem } from '../../shared/units';
import { userResponseSchema } from '../../shared/schemas/auth';
import { api } from './api-client';

// Reads the signed-in user's preference from the same cache entry as the auth feature's `me` query
// (same key), without importing that feature: lib code is shared by all features.
const meKey = ['auth', 'me'] as const;

/** Formatting and parsing in the user's display units; values in and out are SI as stored. */
export function useUnits() {
  const me = useQuery({
    queryKey: meKey,
    queryFn: async () => (await api.get('/auth/me', userResponseSchema)).user,
    enabled: false,
  });
  const system: UnitSystem = me.data?.unitSystem ?? 'metric';
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
