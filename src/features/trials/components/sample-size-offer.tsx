import { useQueries } from '@tanstack/react-query';
import { useState } from 'react';
import { api, queryString } from '../../../lib/api-client';
import { sampleSizeSchema } from '../../../../shared/schemas/analysis';
import { queryKeys } from '../../../lib/queries/keys';

/**
 * How many coupons per condition a two-group comparison needs to find a chosen difference in WPG
 * (power 0.8, α 0.05), from the spread the shop has seen for each species and resin of the plan.
 */
export function SampleSizeOffer({
  species,
  resins,
  couponsPerCondition,
}: {
  species: { id: number; commonName: string }[];
  resins: { id: number; name: string }[];
  couponsPerCondition: number | undefined;
}) {
  const [difference, setDifference] = useState('5');
  const d = Number(difference);
  const valid = Number.isFinite(d) && d > 0 && d <= 500;
  const pairs = species.flatMap((s) => resins.map((r) => ({ s, r })));
  const planned = typeof couponsPerCondition === 'number' && Number.isFinite(couponsPerCondition) ? couponsPerCondition : undefined;
  const answers = useQueries({
    queries: pairs.map(({ s, r }) => {
      const q = { speciesId: s.id, resinId: r.id, differencePct: d, ...(planned !== undefined ? { planned } : {}) };
      return {
        queryKey: [...queryKeys.analysis.all, 'sample-size', q] as const,
        queryFn: () => api.get(`/analysis/sample-size${queryString(q)}`, sampleSizeSchema),
        enabled: valid,
        staleTime: 60_000,
      };
    }),
  });
  if (pairs.length === 0) return null;
  return (
    <section aria-labelledby="sample-size-heading" className="sheet mb-6 p-4">
      <h2 id="sample-size-heading" className="mb-2">
        How many coupons?
      </h2>
      <label className="flex flex-wrap items-center gap-2 text-sm">
        The smallest difference in WPG worth finding
        <input
          type="number"
          className="w-20"
          min="0.1"
          step="0.5"
          value={difference}
          onChange={(e) => setDifference(e.target.value)}
          onKeyDown={(e) => {
            if (e.key === 'Enter') e.preventDefault();
          }}
        />
        percentage points
      </label>
      {valid && (
        <ul className="mt-2 space-y-1 text-sm" data-testid="sample-size-list">
          {pairs.map(({ s, r }, i) => {
            const a = answers[i]?.data;
            return (
              <li key={`${s.id}-${r.id}`}>
                {s.commonName} · {r.name}:{' '}
                {a ? (
                  <>
                    <strong>{a.nPerCondition} coupons per condition</strong> ({a.sdNote}; power 0.8, α 0.05, two-sided two-sample t test between two
                    conditions).
                    {a.warning && <span className="block text-margin">{a.warning}</span>}
                  </>
                ) : (
                  '…'
                )}
              </li>
            );
          })}
        </ul>
      )}
    </section>
  );
}
