import * as Plot from '@observablehq/plot';
import type { Fit, Overview, PlotPoint, PointSet } from '../../../../shared/schemas/analysis';
import { RESIN_SYMBOLS, SPECIES_COLOURS } from './plot-figure';

const WIDTH = 760;
const HEIGHT = 420;

function domains(points: readonly { species: string; resin: string }[]) {
  const species = [...new Set(points.map((p) => p.species))].sort();
  const resins = [...new Set(points.map((p) => p.resin))].sort();
  return { species, resins };
}

const pointTitle = (xLabel: string, digits: number) => (d: PlotPoint) =>
  `${d.tag} — ${d.species}, ${d.resin}\n${xLabel} ${d.x.toFixed(digits)}, WPG ${d.y.toFixed(1)} %`;

/**
 * Above this many dots a plot leaves out the per-dot <title> (a second element per dot, which the browser
 * must build and lay out) and the pointer tip names the coupon from a channel holding the same words.
 */
export const MANY_DOTS = 1000;

/** How the dots of a plot name their coupon on hover: a <title> per dot, or a tip channel when many. */
function naming<T>(count: number, title: (d: T) => string) {
  if (count <= MANY_DOTS) return { title, tip: true } as const;
  return {
    channels: { coupon: { value: (d: T) => title(d).replace('\n', '; '), label: 'Coupon' } },
    tip: { format: { coupon: true, x: false, y: false, fill: false, symbol: false } },
  } as const;
}

/** The coupons as dots: colour by species, symbol by resin, a tip naming the coupon. */
function couponDots(points: PointSet['points'], xLabel: string, digits: number) {
  const outline = points.length > MANY_DOTS ? {} : { stroke: 'white', strokeWidth: 0.6 };
  return Plot.dot(points, {
    x: 'x',
    y: 'y',
    fill: 'species',
    symbol: 'resin',
    r: 4.5,
    fillOpacity: 0.85,
    ...outline,
    ...naming(points.length, pointTitle(xLabel, digits)),
    className: 'coupon-points',
  });
}

function fitMarks(fit: Fit | null) {
  if (!fit || fit.band.length === 0) return [];
  return [
    Plot.areaY(fit.band, { x: 'x', y1: 'lo', y2: 'hi', fill: '#6b6b6b', fillOpacity: 0.2 }),
    Plot.line(fit.band, { x: 'x', y: 'fit', stroke: '#333', strokeWidth: 2 }),
  ];
}

/** WPG against oven-dry SG with the fit, its band and the theoretical maximum per resin. */
export function wpgVsSgPlot(o: Pick<Overview, 'densityFit' | 'theoreticalMax'> & { points: PointSet }, xLabel: string): Element {
  const { species, resins } = domains(o.points.points);
  const maxMarks = o.theoreticalMax.flatMap((t) => [
    Plot.line(t.curve, { x: 'x', y: 'y', stroke: '#555', strokeDasharray: '6 4', strokeWidth: 1.5 }),
    Plot.text([t.curve[Math.floor(t.curve.length * 0.15)]].filter(Boolean), {
      x: 'x',
      y: 'y',
      text: () => `theoretical max, ${t.resinName}`,
      dy: -8,
      textAnchor: 'start',
      fill: '#333',
    }),
  ]);
  return Plot.plot({
    width: WIDTH,
    height: HEIGHT,
    marginLeft: 56,
    grid: true,
    x: { label: xLabel },
    y: { label: 'WPG (%)' },
    color: { type: 'ordinal', domain: species, range: SPECIES_COLOURS, legend: true },
    symbol: { domain: resins, range: RESIN_SYMBOLS, legend: true },
    marks: [...fitMarks(o.densityFit), ...maxMarks, couponDots(o.points.points, 'SG', 3)],
  });
}

/** A length axis in the reader's unit: its label ("in") and the factor from the stored millimetres. */
export interface LengthAxis {
  label: string;
  perMm: number;
  digits: number;
}

export function wpgVsThicknessPlot(fitMm: Fit | null, pointsMm: PointSet, axis: LengthAxis = { label: 'mm', perMm: 1, digits: 1 }): Element {
  // Thickness is stored in mm; the axis, the dots and the fitted line are drawn in the reader's unit.
  const points = { ...pointsMm, points: pointsMm.points.map((p) => ({ ...p, x: p.x * axis.perMm })) };
  const fit = fitMm && { ...fitMm, band: fitMm.band.map((b) => ({ ...b, x: b.x * axis.perMm })) };
  const { species, resins } = domains(points.points);
  return Plot.plot({
    width: WIDTH,
    height: HEIGHT,
    marginLeft: 56,
    grid: true,
    x: { label: `Thickness (${axis.label})` },
    y: { label: 'WPG (%)' },
    color: { type: 'ordinal', domain: species, range: SPECIES_COLOURS, legend: true },
    symbol: { domain: resins, range: RESIN_SYMBOLS, legend: true },
    marks: [...fitMarks(fit), couponDots(points.points, `thickness (${axis.label})`, axis.digits)],
  });
}

export function residualPlot(points: PointSet): Element {
  const { species, resins } = domains(points.points);
  return Plot.plot({
    width: WIDTH,
    height: 320,
    marginLeft: 56,
    grid: true,
    x: { label: 'Fitted WPG (%)' },
    y: { label: 'Residual (WPG points)' },
    color: { type: 'ordinal', domain: species, range: SPECIES_COLOURS, legend: true },
    symbol: { domain: resins, range: RESIN_SYMBOLS },
    marks: [
      Plot.ruleY([0], { stroke: '#333' }),
      Plot.dot(points.points, {
        x: 'x',
        y: 'y',
        fill: 'species',
        symbol: 'resin',
        r: 4,
        fillOpacity: 0.85,
        ...naming(points.points.length, (d: PlotPoint) => `${d.tag} — ${d.species}, ${d.resin}\nfitted ${d.x.toFixed(1)} %, residual ${d.y.toFixed(1)}`),
      }),
    ],
  });
}

const ROLE_COLOURS = { treated: '#0072B2', control: '#D55E00' };

/** Hardness, treated against control, per species and resin, one row per group, per scale. */
export function hardnessPlot(rows: Overview['plots']['hardness']): Element {
  const groups = [...new Set(rows.map((r) => `${r.species} · ${r.resin}`))].sort();
  return Plot.plot({
    width: WIDTH,
    height: Math.max(160, 40 + groups.length * 34),
    marginLeft: 220,
    grid: true,
    x: { label: `Hardness (${[...new Set(rows.map((r) => r.scale))].join(', ')})` },
    y: { label: null, domain: groups },
    color: { domain: ['treated', 'control'], range: [ROLE_COLOURS.treated, ROLE_COLOURS.control], legend: true },
    symbol: { domain: ['treated', 'control'], range: ['circle', 'square'] },
    marks: [
      Plot.dot(rows, {
        x: 'value',
        y: (d: (typeof rows)[number]) => `${d.species} · ${d.resin}`,
        fill: 'role',
        symbol: 'role',
        r: 4.5,
        fillOpacity: 0.85,
        ...naming(rows.length, (d: (typeof rows)[number]) => `${d.tag} — ${d.species}, ${d.role}: ${d.value} ${d.scale}`),
      }),
    ],
  });
}

/** Water-soak swelling, treated against control, per species and resin. */
export function swellingPlot(rows: Overview['plots']['swelling']): Element {
  const groups = [...new Set(rows.map((r) => `${r.species} · ${r.resin}`))].sort();
  return Plot.plot({
    width: WIDTH,
    height: Math.max(160, 40 + groups.length * 34),
    marginLeft: 220,
    grid: true,
    x: { label: 'Swelling in the water soak (%)' },
    y: { label: null, domain: groups },
    color: { domain: ['treated', 'control'], range: [ROLE_COLOURS.treated, ROLE_COLOURS.control], legend: true },
    symbol: { domain: ['treated', 'control'], range: ['circle', 'square'] },
    marks: [
      Plot.ruleX([0]),
      Plot.dot(rows, {
        x: 'swellingPct',
        y: (d: (typeof rows)[number]) => `${d.species} · ${d.resin}`,
        fill: 'role',
        symbol: 'role',
        r: 4.5,
        fillOpacity: 0.85,
        ...naming(
          rows.length,
          (d: (typeof rows)[number]) =>
            `${d.tag} — ${d.species}, ${d.role}: swelling ${d.swellingPct.toFixed(1)} %` +
            (d.asePct !== null ? `, ASE ${d.asePct.toFixed(0)} %` : '') +
            (d.wrePct !== null ? `, WRE ${d.wrePct.toFixed(0)} %` : ''),
        ),
      }),
    ],
  });
}
