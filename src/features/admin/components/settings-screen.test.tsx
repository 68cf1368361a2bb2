// @vitest-environment jsdom
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { cleanup, fireEvent, render, screen, waitFor } from '@testing-library/react';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { DEFAULT_SHOP_SETTINGS, type ShopSettings } from '../../../../shared/schemas/admin';
import { unitPrefs } from '../../../../shared/units';
import { NOT_A_NUMBER } from '../../../lib/forms/parse-number';
import { queryKeys } from '../../../lib/queries/keys';
import { SettingsScreen } from './settings-screen';

afterEach(cleanup);

let sent: Record<string, unknown>[] = [];
let stored: ShopSettings;
const labelAddress = { url: 'http://shop-pc:3000', source: 'app-url', loopback: false, warning: null };

beforeEach(() => {
  sent = [];
  stored = { ...DEFAULT_SHOP_SETTINGS, altitudeM: 457.2 };
  // The server as far as this screen needs it: GET and PATCH /api/settings.
  vi.stubGlobal('fetch', async (_url: string, init: RequestInit) => {
    if (init.method === 'PATCH') {
      const body = JSON.parse(String(init.body)) as Record<string, unknown>;
      sent.push(body);
      stored = { ...stored, ...body };
    }
    return new Response(JSON.stringify({ settings: stored, labelAddress }), { status: 200, headers: { 'Content-Type': 'application/json' } });
  });
});
afterEach(() => vi.unstubAllGlobals());

/** The settings screen as an admin with these units sees it. */
function renderAs(system: 'metric' | 'us') {
  const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  qc.setQueryData(queryKeys.session.me(), {
    id: 1,
    email: 'admin@demo.test',
    name: 'Admin',
    role: 'admin',
    unitSystem: system,
    units: unitPrefs(system),
    disabled: false,
  });
  qc.setQueryData(queryKeys.settings.all, stored);
  render(
    <QueryClientProvider client={qc}>
      <SettingsScreen />
    </QueryClientProvider>,
  );
}

const box = (name: RegExp) => screen.getByRole('textbox', { name });

describe('shop altitude in the settings, in the user units', () => {
  it('shows a US user the altitude in feet and stores what they type in metres (1,500 ft = 457.2 m, NIST SP 811)', async () => {
    renderAs('us');
    const altitude = box(/Shop altitude above sea level \(ft\)/);
    expect((altitude as HTMLInputElement).value).toBe('1500');
    fireEvent.change(altitude, { target: { value: '2000' } });
    fireEvent.click(screen.getByRole('button', { name: 'Save settings' }));
    await waitFor(() => expect(sent).toHaveLength(1));
    expect(sent[0]!.altitudeM as number).toBeCloseTo(609.6, 9); // 2,000 × 0.3048 exactly
    expect(await screen.findByText('Saved.')).toBeTruthy();
  });

  it('shows a metric user metres and questions 5,000 typed for a shop at 5,000 ft', async () => {
    renderAs('metric');
    const altitude = box(/Shop altitude above sea level \(m\)/);
    expect((altitude as HTMLInputElement).value).toBe('457.2');
    expect(screen.queryByText(/higher than nearly any workshop/)).toBeNull();
    fireEvent.change(altitude, { target: { value: '5000' } });
    expect((await screen.findByRole('status')).textContent).toMatch(/5,000 m is higher than nearly any workshop.*If you meant 5,000 ft, that is 1,524 m\./);
    fireEvent.change(altitude, { target: { value: '1524' } });
    await waitFor(() => expect(screen.queryByText(/higher than nearly any workshop/)).toBeNull());
  });

  it('questions a US user above 3,000 m (12,000 ft) in feet and inHg, and names a bad number on the box', async () => {
    renderAs('us');
    const altitude = box(/Shop altitude above sea level \(ft\)/);
    fireEvent.change(altitude, { target: { value: '12000' } });
    // U.S. Standard Atmosphere 1976 at 3,657.6 m: about 64.5 kPa = 19.0 inHg.
    expect((await screen.findByRole('status')).textContent).toMatch(
      /12,000 ft is higher than nearly any workshop: the standard air pressure there is 19\.0 inHg/,
    );
    fireEvent.change(altitude, { target: { value: 'high' } });
    fireEvent.click(screen.getByRole('button', { name: 'Save settings' }));
    expect(await screen.findByText(NOT_A_NUMBER)).toBeTruthy();
    expect(sent).toHaveLength(0);
  });
});
