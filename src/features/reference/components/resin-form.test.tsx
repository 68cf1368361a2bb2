// @vitest-environment jsdom
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { cleanup, fireEvent, render, screen, waitFor } from '@testing-library/react';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import type { Resin } from '../../../../shared/schemas/reference';
import { unitPrefs } from '../../../../shared/units';
import { queryKeys } from '../../../lib/queries/keys';
import { ResinForm } from './resin-form';

afterEach(cleanup);

const RESIN: Resin = {
  id: 7,
  name: 'Shop blend A',
  kind: 'methacrylate monomer blend',
  liquidDensityGcm3: 1.02,
  curedDensityGcm3: 1.18,
  cureMinC: 85,
  cureMaxC: 95,
  shelfLifeDays: 180,
  notes: null,
  createdAt: '2026-01-01T00:00:00.000Z',
  usableLots: 1,
};
const MOVED = 'This change moves the results of 3 measured coupons (void fill, maximum uptake); say why in the reason';

let sent: Record<string, unknown>[] = [];

beforeEach(() => {
  sent = [];
  // The server as far as this form needs it: PATCH /api/resins/7 refuses a change that moves measured
  // results without a reason (as the reference service does), and takes it with one.
  vi.stubGlobal('fetch', async (_url: string, init: RequestInit) => {
    const body = JSON.parse(String(init.body)) as Record<string, unknown>;
    sent.push(body);
    if (!body.reason)
      return new Response(JSON.stringify({ error: { code: 'validation_failed', message: MOVED, fieldErrors: { reason: [MOVED] } } }), {
        status: 422,
        headers: { 'Content-Type': 'application/json' },
      });
    return new Response(JSON.stringify({ resin: { ...RESIN, curedDensityGcm3: body.curedDensityGcm3 } }), {
      status: 200,
      headers: { 'Content-Type': 'application/json' },
    });
  });
});
afterEach(() => vi.unstubAllGlobals());

function renderEditing(onDone: (name: string) => void) {
  const qc = new QueryClient({ defaultOptions: { queries: { retry: false } } });
  qc.setQueryData(queryKeys.session.me(), {
    id: 3,
    email: 'tech@demo.test',
    name: 'Tech',
    role: 'technician',
    unitSystem: 'metric',
    units: unitPrefs('metric'),
    disabled: false,
  });
  render(
    <QueryClientProvider client={qc}>
      <ResinForm resin={RESIN} onDone={onDone} onCancel={() => undefined} />
    </QueryClientProvider>,
  );
}

describe('editing a resin whose densities feed measured coupons', () => {
  it('shows the server’s request for a reason on the reason box, then sends the reason beside the change', async () => {
    const onDone = vi.fn();
    renderEditing(onDone);
    fireEvent.change(screen.getByLabelText(/^Cured density/), { target: { value: '1200' } });
    fireEvent.click(screen.getByRole('button', { name: 'Save the changes' }));
    const reasonBox = screen.getByLabelText('Why it changes');
    await waitFor(() => expect(reasonBox.getAttribute('aria-invalid')).toBe('true'));
    expect(screen.getByRole('alert').textContent).toBe(MOVED);
    expect(onDone).not.toHaveBeenCalled();

    fireEvent.change(reasonBox, { target: { value: 'The maker’s new sheet gives 1.20 g/cm³ cured' } });
    fireEvent.click(screen.getByRole('button', { name: 'Save the changes' }));
    await waitFor(() => expect(onDone).toHaveBeenCalledWith('Shop blend A'));
    // 1200 kg/m³ typed = 1.2 g/cm³ stored; the reason travels beside the fields, never inside the resin.
    expect(sent[1]).toMatchObject({ curedDensityGcm3: 1.2, reason: 'The maker’s new sheet gives 1.20 g/cm³ cured' });
    expect(sent[0]).not.toHaveProperty('reason');
  });
});
