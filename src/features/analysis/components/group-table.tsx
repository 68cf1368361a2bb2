import { useMemo, useState } from 'react';
import type { GroupRow, SummaryStats } from '../../../../shared/schemas/analysis';
import { groupsCsv } from '../../../../shared/analysis/csv';
import { HARDNESS_SCALE_LABELS } from '../../../../shared/constants/records';
import { useUnits } from '../../../lib/use-units';

/** Summary statistics scaled into another unit (a linear one: no offset), for a column in the reader's unit. */
function scaled(s: SummaryStats | null, factor: number): SummaryStats | null {
  if (!s) return null;
  return { ...s, mean: s.mean * factor, sd: s.sd === null ? null : s.sd * factor, ci95: s.ci95 ? [s.ci95[0] * factor, s.ci95[1] * factor] : s.ci95 };
}

type SortKey = 'species' | 'resin' | 'n' | 'wpg' | 'loading' | 'voidFill' | 'hardness' | 'ase' | 'wre';

const statValue = (s: SummaryStats | null) => s?.mean ?? Number.NEGATIVE_INFINITY;
function valueOf(g: GroupRow, k: SortKey): string | number {
  switch (k) {
    case 'species':
      return g.speciesName;
    case 'resin':
      return g.resinName ?? '';
    case 'n':
      return g.nCoupons;
    case 'wpg':
      return statValue(g.wpg);
    case 'loading':
      return statValue(g.resinLoading);
    case 'voidFill':
      return statValue(g.voidFill);
    case 'hardness':
      return g.hardnessGain?.ratio ?? Number.NEGATIVE_INFINITY;
    case 'ase':
      return statValue(g.ase);
    case 'wre':
      return statValue(g.wre);
  }
}

function MeanCi({ s, digits = 1 }: { s: SummaryStats | null; digits?: number }) {
  if (!s) return <span className="text-ink-faint">—</span>;
  return (
    <span>
      {s.mean.toFixed(digits)}
      {s.ci95 ? (
        <span className="block text-xs text-ink-soft">
          {s.ci95[0].toFixed(digits)} to {s.ci95[1].toFixed(digits)}
        </span>
      ) : (
        <span className="block text-xs text-ink-soft">one coupon, no CI</span>
      )}
    </span>
  );
}

export function downloadText(text: string, name: string, type: string): void {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

/** The species × resin table, sortable by any column, with a CSV export. */
export function GroupTable({ groups }: { groups: GroupRow[] }) {
  const units = useUnits();
  const [sort, setSort] = useState<{ key: SortKey; desc: boolean }>({ key: 'species', desc: false });
  const rows = useMemo(() => {
    const out = [...groups];
    out.sort((a, b) => {
      const x = valueOf(a, sort.key);
      const y = valueOf(b, sort.key);
      const c = typeof x === 'string' && typeof y === 'string' ? x.localeCompare(y) : (x as number) - (y as number);
      return sort.desc ? -c : c;
    });
    return out;
  }, [groups, sort]);
  // The mass-basis efficiency gets its own column only when some group has one (it is never pooled with ASE).
  const anyWre = groups.some((g) => g.wre !== null);

  const header = (key: SortKey, label: string, sub?: string) => (
    <th scope="col" aria-sort={sort.key === key ? (sort.desc ? 'descending' : 'ascending') : 'none'}>
      <button
        type="button"
        className="font-semibold underline-offset-2 hover:underline"
        onClick={() => setSort((s) => ({ key, desc: s.key === key ? !s.desc : false }))}
      >
        {label}
        {sort.key === key ? (sort.desc ? ' ▼' : ' ▲') : ''}
      </button>
      {sub && <span className="block text-xs font-normal text-ink-soft">{sub}</span>}
    </th>
  );

  return (
    <section aria-labelledby="group-table-h" className="mb-8">
      <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="group-table-h">Species × resin</h2>
        <button type="button" className="btn-quiet text-sm" onClick={() => downloadText(groupsCsv(rows), 'species-by-resin.csv', 'text/csv')}>
          Download CSV
        </button>
      </div>
      {rows.length === 0 ? (
        <p className="text-ink-soft">No treated coupon with WPG and SG matches these filters.</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="data-table">
            <caption className="sr-only">Species by resin: coupons, boards, and means with 95 % confidence intervals</caption>
            <thead>
              <tr>
                {header('species', 'Species')}
                {header('resin', 'Resin')}
                {header('n', 'n', 'coupons / boards')}
                {header('wpg', 'WPG %', 'mean, 95 % CI')}
                {header('loading', `Loading ${units.label('density')}`, 'mean, 95 % CI')}
                {header('voidFill', 'Void fill %', 'mean, 95 % CI')}
                {header('hardness', 'Hardness gain', 'treated / control')}
                {header('ase', 'ASE %', 'anti-swell efficiency, on dimensions; mean, 95 % CI')}
                {anyWre && header('wre', 'WRE %', 'water-repellent effectiveness, on mass; mean, 95 % CI')}
              </tr>
            </thead>
            <tbody>
              {rows.map((g) => (
                <tr key={`${g.speciesId}|${g.resinId}`}>
                  <th scope="row" className="text-left font-normal">
                    {g.speciesName}
                  </th>
                  <td>{g.resinName ?? '—'}</td>
                  <td>
                    {g.nCoupons} / {g.nBoards + g.nNoBoard}
                    {g.nNoBoard > 0 && <span className="block text-xs text-ink-soft">{g.nNoBoard} without a board named</span>}
                  </td>
                  <td>
                    <MeanCi s={g.wpg} />
                  </td>
                  <td>
                    <MeanCi s={scaled(g.resinLoading, units.toDisplay(1, 'density'))} digits={units.decimals('density')} />
                  </td>
                  <td>
                    <MeanCi s={g.voidFill} />
                  </td>
                  <td>
                    {g.hardnessGain ? (
                      <span>
                        × {g.hardnessGain.ratio.toFixed(2)}
                        <span className="block text-xs text-ink-soft">
                          {HARDNESS_SCALE_LABELS[g.hardnessGain.scale]}, {g.hardnessGain.nTreated} vs {g.hardnessGain.nControl}
                        </span>
                      </span>
                    ) : (
                      <span className="text-ink-faint">—</span>
                    )}
                  </td>
                  <td>
                    <MeanCi s={g.ase} digits={0} />
                  </td>
                  {anyWre && (
                    <td>
                      <MeanCi s={g.wre} digits={0} />
                    </td>
                  )}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}
