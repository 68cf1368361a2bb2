import { createRequire } from 'node:module';
import type * as PlotModule from '@observablehq/plot';
import type { JSDOM as JsdomClass } from 'jsdom';
import { sanitizeSvg } from '../../markdown/render';

// jsdom and Plot are loaded on the first plot drawn, not at start: jsdom adds ~95 MB to the server's resident
// memory, Plot and its d3 modules several MB more (bench/server-memory.ts), and most processes never freeze a
// finding's plot. `require` keeps this function synchronous (it runs in the demo seed's transaction); Plot is
// an ES module, which Node (20.19 and later) loads through require too.
const require = createRequire(import.meta.url);
let jsdom: typeof JsdomClass | null = null;
const JSDOM = () => (jsdom ??= (require('jsdom') as { JSDOM: typeof JsdomClass }).JSDOM);
let plotModule: typeof PlotModule | null = null;
const Plot = () => (plotModule ??= require('@observablehq/plot') as typeof PlotModule);

interface Point {
  x: number;
  y: number;
  species: string;
  resin: string;
}

const isPoint = (p: unknown): p is Point => {
  const o = p as Record<string, unknown>;
  return typeof o === 'object' && o !== null && Number.isFinite(o.x) && Number.isFinite(o.y) && typeof o.species === 'string' && typeof o.resin === 'string';
};

/**
 * Draws the plot of a saved view's snapshot as SVG, on the server, so the picture frozen with a
 * finding is one the server made from the frozen numbers (a browser could send anything). Observable
 * Plot renders into a jsdom document; the markup is then cleaned like any other SVG we store.
 * Returns null when the snapshot carries no plottable points.
 */
export function plotSvgFromSnapshot(snapshot: Record<string, unknown>): string | null {
  const plot = snapshot.plot as { spec?: { x?: { label?: string }; y?: { label?: string }; caption?: string }; data?: { points?: unknown[] } } | undefined;
  const points = (plot?.data?.points ?? []).filter(isPoint);
  if (points.length === 0) return null;
  const { window } = new (JSDOM())('<!doctype html><html><body></body></html>');
  const { plot: draw, dot } = Plot();
  const figure = draw({
    document: window.document,
    width: 640,
    height: 400,
    marginLeft: 56,
    grid: true,
    style: { fontFamily: 'sans-serif', fontSize: '12px', background: 'white', color: 'black' },
    x: { label: plot?.spec?.x?.label ?? 'x' },
    y: { label: plot?.spec?.y?.label ?? 'y' },
    color: { legend: false },
    symbol: { legend: false },
    marks: [dot(points, { x: 'x', y: 'y', stroke: 'species', symbol: 'resin', r: 4 })],
  });
  const svg = figure.tagName.toLowerCase() === 'svg' ? figure : figure.querySelector('svg');
  if (!svg) return null;
  svg.setAttribute('xmlns', 'http://www.w3.org/2000/svg');
  const out = sanitizeSvg(svg.outerHTML);
  window.close();
  return out;
}
