import Papa from 'papaparse';
import type { GroupRow } from '../schemas/analysis';

/**
 * CSV text through papaparse with `escapeFormulae`: a text cell that starts with = + − @ tab or CR gets a
 * leading apostrophe, so a spreadsheet shows it instead of running it (OWASP "CSV Injection").
 * Numbers stay numbers (a negative difference is data, not a formula).
 */
export function toCsv(header: readonly string[], rows: readonly (readonly (string | number | null)[])[]): string {
  return Papa.unparse({ fields: [...header], data: rows.map((r) => r.map((v) => (v === null ? '' : v))) }, { escapeFormulae: true, newline: '\r\n' });
}

const r = (v: number | null | undefined, digits: number) => (v === null || v === undefined ? null : Number(v.toFixed(digits)));

/** The species × resin table as CSV, one row per group, units in the header. */
export function groupsCsv(groups: readonly GroupRow[]): string {
  const header = [
    'species',
    'resin',
    'coupons',
    'source boards',
    'coupons without board',
    'mean WPG %',
    'WPG CI low %',
    'WPG CI high %',
    'WPG SD %',
    'mean resin loading kg/m3',
    'loading CI low',
    'loading CI high',
    'mean void fill %',
    'void fill CI low',
    'void fill CI high',
    'hardness gain (treated/control)',
    'hardness scale',
    'mean ASE %',
    'ASE CI low',
    'ASE CI high',
    'mean WRE %',
    'WRE CI low',
    'WRE CI high',
  ];
  const rows = groups.map((g) => [
    g.speciesName,
    g.resinName ?? '',
    g.nCoupons,
    g.nBoards,
    g.nNoBoard,
    r(g.wpg?.mean, 2),
    r(g.wpg?.ci95?.[0], 2),
    r(g.wpg?.ci95?.[1], 2),
    r(g.wpg?.sd, 2),
    r(g.resinLoading?.mean, 1),
    r(g.resinLoading?.ci95?.[0], 1),
    r(g.resinLoading?.ci95?.[1], 1),
    r(g.voidFill?.mean, 1),
    r(g.voidFill?.ci95?.[0], 1),
    r(g.voidFill?.ci95?.[1], 1),
    r(g.hardnessGain?.ratio, 3),
    g.hardnessGain?.scale ?? '',
    r(g.ase?.mean, 1),
    r(g.ase?.ci95?.[0], 1),
    r(g.ase?.ci95?.[1], 1),
    r(g.wre?.mean, 1),
    r(g.wre?.ci95?.[0], 1),
    r(g.wre?.ci95?.[1], 1),
  ]);
  return toCsv(header, rows);
}
