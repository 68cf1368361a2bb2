// @vitest-environment jsdom
import { cleanup, render, screen } from '@testing-library/react';
import { createMemoryRouter, RouterProvider } from 'react-router-dom';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { RouteError } from './route-error';

afterEach(cleanup);

function Boom(): never {
  throw new Error('The trial page could not read its plan');
}

function at(path: string, route: Parameters<typeof createMemoryRouter>[0][number]) {
  const router = createMemoryRouter(
    [
      { path: '/', element: <p>Bench</p> },
      { ...route, ErrorBoundary: RouteError },
    ],
    { initialEntries: [path] },
  );
  render(<RouterProvider router={router} />);
}

describe('the error element of every route', () => {
  it('says what failed in a render and offers a way back to the Bench', async () => {
    // React reports an error caught by a boundary on the console; here that is the point of the test.
    vi.mocked(console.error).mockImplementation(() => undefined);
    at('/trials/1', { path: '/trials/:id', element: <Boom /> });
    expect(await screen.findByRole('heading', { level: 1, name: 'This page failed' })).toBeTruthy();
    expect(screen.getByRole('alert').textContent).toContain('The trial page could not read its plan');
    expect(screen.getByRole('link', { name: 'Back to the Bench' }).getAttribute('href')).toBe('/');
    expect(screen.getByRole('button', { name: 'Reload this page' })).toBeTruthy();
    expect(document.title).toBe('This page failed · Lumenbook');
  });

  it('names a 404 from a loader as a missing page', async () => {
    at('/runs/999', {
      path: '/runs/:id',
      loader: () => {
        throw new Response('no such run', { status: 404 });
      },
      element: <p>never shown</p>,
    });
    expect(await screen.findByRole('heading', { level: 1, name: 'Not found' })).toBeTruthy();
    expect(screen.queryByText('never shown')).toBeNull();
  });

  it('tells a screen whose code could not be downloaded to reload', async () => {
    at('/compare', {
      path: '/compare',
      lazy: async () => {
        throw new TypeError('Failed to fetch dynamically imported module: /assets/compare-route.js');
      },
    });
    expect(await screen.findByRole('heading', { level: 1, name: 'This page could not load' })).toBeTruthy();
  });
});
