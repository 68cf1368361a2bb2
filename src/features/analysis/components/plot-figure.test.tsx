// @vitest-environment jsdom
import { cleanup, render, screen, waitFor } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { PlotFigure } from './plot-figure';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

/** A stand-in chart as Observable Plot makes them: an svg whose groups carry aria-label. */
function chart(): Element {
  const ns = 'http://www.w3.org/2000/svg';
  const svg = document.createElementNS(ns, 'svg');
  const g = document.createElementNS(ns, 'g');
  g.setAttribute('aria-label', 'dot');
  g.append(document.createElementNS(ns, 'circle'), document.createElementNS(ns, 'circle'));
  svg.append(g);
  return svg;
}

describe('a plot on the Compare screen', () => {
  it('is drawn as one image named by its title and described by its caption, with no label on bare groups', async () => {
    // jsdom has no IntersectionObserver: the plot counts as near the window at once.
    const { container } = render(<PlotFigure title="WPG against SG" caption="WPG falls as SG rises." fileName="x" build={chart} />);
    const img = await screen.findByRole('img', { name: 'WPG against SG' });
    expect(img.getAttribute('aria-describedby')).toBe(container.querySelector('figcaption')?.id);
    expect(container.querySelector('g[aria-label]')).toBeNull();
  });

  it('waits until it comes near the window, showing its caption meanwhile', async () => {
    let notify: ((entries: { isIntersecting: boolean }[]) => void) | null = null;
    vi.stubGlobal(
      'IntersectionObserver',
      class {
        constructor(cb: (entries: { isIntersecting: boolean }[]) => void) {
          notify = cb;
        }
        observe() {}
        disconnect() {}
      },
    );
    const build = vi.fn(chart);
    render(<PlotFigure title="Residuals" caption="Distance from the line." fileName="x" build={build} />);
    expect(screen.getByText('Distance from the line.')).toBeTruthy();
    await new Promise((r) => setTimeout(r, 20));
    expect(build).not.toHaveBeenCalled();
    expect(screen.queryByRole('img')).toBeNull();
    notify!([{ isIntersecting: true }]);
    await waitFor(() => expect(screen.getByRole('img', { name: 'Residuals' })).toBeTruthy());
    expect(build).toHaveBeenCalledTimes(1);
  });
});
