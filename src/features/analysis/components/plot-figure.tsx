import { useCallback, useEffect, useId, useRef, useState, type RefObject } from 'react';

/**
 * Colour-blind-safe palette for species: the eight colours of Okabe & Ito, "Color Universal Design"
 * (2008), in an order of our own, yellow last since it is faint on white.
 */
export const SPECIES_COLOURS = ['#0072B2', '#D55E00', '#009E73', '#CC79A7', '#E69F00', '#56B4E9', '#000000', '#F0E442'];
/** Symbols for resins, so a resin reads without colour. */
export const RESIN_SYMBOLS = ['circle', 'triangle', 'square', 'diamond', 'cross', 'star', 'wye', 'times'];

/**
 * Plot puts aria-label (and aria-description) on bare <g> elements, which ARIA does not allow on an
 * element without a role (axe: aria-prohibited-attr). The chart itself is one image whose name is the
 * title and whose description is the visible caption; the marks inside need no names of their own.
 */
export function makeAccessible(root: Element, title: string, captionId: string): void {
  const svgs = root.tagName.toLowerCase() === 'svg' ? [root] : [...root.querySelectorAll('svg')];
  for (const svg of svgs) {
    for (const g of svg.querySelectorAll('g[aria-label], g[aria-description]')) {
      g.removeAttribute('aria-label');
      g.removeAttribute('aria-description');
    }
  }
  // The main chart is the svg with the most elements; legend swatches are small decorative svgs.
  const main = svgs.reduce<Element | null>((best, s) => (!best || s.querySelectorAll('*').length > best.querySelectorAll('*').length ? s : best), null);
  for (const svg of svgs) {
    if (svg === main) {
      svg.setAttribute('role', 'img');
      svg.setAttribute('aria-label', title);
      svg.setAttribute('aria-describedby', captionId);
      svg.removeAttribute('aria-description');
    } else {
      svg.setAttribute('aria-hidden', 'true');
    }
  }
}

function download(blob: Blob, name: string): void {
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

/** The chart as a standalone SVG file: the main svg with its namespace and a white background. */
function svgText(root: Element): string | null {
  const svg = root.querySelector('svg[role="img"]') ?? (root.tagName.toLowerCase() === 'svg' ? root : null);
  if (!svg) return null;
  const copy = svg.cloneNode(true) as SVGSVGElement;
  copy.setAttribute('xmlns', 'http://www.w3.org/2000/svg');
  copy.setAttribute('xmlns:xlink', 'http://www.w3.org/1999/xlink');
  copy.style.background = 'white';
  return new XMLSerializer().serializeToString(copy);
}

function downloadPng(text: string, name: string): void {
  const blob = new Blob([text], { type: 'image/svg+xml' });
  const url = URL.createObjectURL(blob);
  const img = new Image();
  img.onload = () => {
    const scale = 2;
    const canvas = document.createElement('canvas');
    canvas.width = img.width * scale;
    canvas.height = img.height * scale;
    const ctx = canvas.getContext('2d');
    if (!ctx) return;
    ctx.fillStyle = 'white';
    ctx.fillRect(0, 0, canvas.width, canvas.height);
    ctx.drawImage(img, 0, 0, canvas.width, canvas.height);
    URL.revokeObjectURL(url);
    canvas.toBlob((png) => png && download(png, name), 'image/png');
  };
  img.src = url;
}

/**
 * True once the element has come within a short distance of the viewport (and from then on). Where the
 * browser has no IntersectionObserver (jsdom), at once.
 */
function useNearViewport(ref: RefObject<Element | null>): boolean {
  const [near, setNear] = useState(() => typeof IntersectionObserver === 'undefined');
  useEffect(() => {
    const el = ref.current;
    if (near || !el) return;
    const io = new IntersectionObserver(
      (entries) => {
        if (entries.some((e) => e.isIntersecting)) {
          setNear(true);
          io.disconnect();
        }
      },
      { rootMargin: '0px 0px 200px 0px' },
    );
    io.observe(el);
    return () => io.disconnect();
  }, [ref, near]);
  return near;
}

/**
 * Plots are drawn one at a time, each in a task of its own, so the browser paints the first before it
 * builds the next and a page of five plots never holds the screen for the sum of them.
 */
const queue: (() => void)[] = [];
let draining = false;
function drawSoon(task: () => void): () => void {
  queue.push(task);
  if (!draining) {
    draining = true;
    const next = () => {
      const t = queue.shift();
      if (!t) {
        draining = false;
        return;
      }
      t();
      setTimeout(next, 0);
    };
    setTimeout(next, 0);
  }
  return () => {
    const i = queue.indexOf(task);
    if (i >= 0) queue.splice(i, 1);
  };
}

/**
 * One plot: built by `build` (an Observable Plot element), made accessible, with a caption that states
 * the result in words, SVG and PNG downloads, and a click on a point that reports the point's datum.
 *
 * Drawing is the costly part of the Compare screen (thousands of SVG elements per plot to build, lay out
 * and paint), so a plot is built only when it comes near the viewport, one plot per task (see drawSoon);
 * until then its place holds the caption, which states the result in words anyway. A download builds
 * the plot at once if it has not been drawn yet.
 */
export function PlotFigure({
  title,
  caption,
  fileName,
  build,
  onPick,
  testId,
}: {
  title: string;
  caption: string;
  fileName: string;
  build: () => Element;
  onPick?: (datum: unknown) => void;
  testId?: string;
}) {
  const holder = useRef<HTMLDivElement>(null);
  const chart = useRef<Element | null>(null);
  const captionId = useId();
  const headingId = useId();
  const near = useNearViewport(holder);
  const [drawnBuild, setDrawnBuild] = useState<(() => Element) | null>(null);
  const drawnTitle = useRef<string | null>(null);

  /** Builds the chart now (unless this build and title are the ones shown) and puts it in place; returns it. */
  const draw = useCallback(() => {
    if (chart.current && chart.current.isConnected && drawnBuild === build && drawnTitle.current === title) return chart.current;
    const el = build();
    makeAccessible(el, title, captionId);
    holder.current?.replaceChildren(el);
    chart.current = el;
    drawnTitle.current = title;
    setDrawnBuild(() => build);
    return el;
  }, [build, title, captionId, drawnBuild]);

  useEffect(() => {
    if (!near) return;
    return drawSoon(() => draw());
  }, [near, draw]);

  // Clicks are read from the holder, so the listener outlives each rebuilt chart.
  useEffect(() => {
    const box = holder.current;
    if (!box || !onPick) return;
    const onClick = () => {
      const v = (chart.current as (Element & { value?: unknown }) | null)?.value;
      if (v !== undefined && v !== null) onPick(v);
    };
    box.addEventListener('click', onClick);
    return () => box.removeEventListener('click', onClick);
  }, [onPick]);

  const save = (kind: 'svg' | 'png') => {
    const text = svgText(draw());
    if (!text) return;
    if (kind === 'svg') download(new Blob([text], { type: 'image/svg+xml' }), `${fileName}.svg`);
    else downloadPng(text, `${fileName}.png`);
  };

  return (
    <figure className="sheet mb-6 p-4" aria-labelledby={headingId} data-testid={testId}>
      <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
        <h3 id={headingId} className="text-base font-semibold">
          {title}
        </h3>
        <div className="flex gap-2">
          <button type="button" className="btn-quiet text-sm" onClick={() => save('svg')}>
            Download SVG<span className="sr-only"> of {title}</span>
          </button>
          <button type="button" className="btn-quiet text-sm" onClick={() => save('png')}>
            Download PNG<span className="sr-only"> of {title}</span>
          </button>
        </div>
      </div>
      <div ref={holder} className="overflow-x-auto" style={drawnBuild === build ? undefined : { minHeight: 320 }} />
      <figcaption id={captionId} className="mt-2 text-sm text-ink-soft">
        {caption}
      </figcaption>
    </figure>
  );
}
