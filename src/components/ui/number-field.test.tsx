// @vitest-environment jsdom
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { cleanup, fireEvent, render, screen, waitFor } from '@testing-library/react';
import { useForm } from 'react-hook-form';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import { unitPrefs } from '../../../shared/units';
import { NOT_A_NUMBER } from '../../lib/forms/parse-number';
import { toSi } from '../../lib/forms/number-input';
import { convertingResolver } from '../../lib/forms/resolver';
import { queryKeys } from '../../lib/queries/keys';
import { useUnits } from '../../lib/use-units';
import { NumberField } from './number-field';

afterEach(cleanup);

const schema = z.strictObject({ massG: z.number().positive('The mass must be above zero') });
type Values = { mass: number | null };

function MassForm({ onSaved }: { onSaved: (massG: number) => void }) {
  const units = useUnits();
  const form = useForm<Values, unknown, z.output<typeof schema>>({
    defaultValues: { mass: null },
    resolver: convertingResolver<Values, typeof schema>(
      schema,
      (v) => ({ massG: toSi(v.mass, 'mass', units) ?? undefined }),
      { massG: 'mass' },
      { massG: 'Enter the mass' },
    ),
  });
  return (
    <form noValidate onSubmit={(e) => void form.handleSubmit((v) => onSaved(v.massG))(e)}>
      <NumberField form={form} name="mass" label="Mass" quantity="mass" />
      <button type="submit">Save</button>
    </form>
  );
}

/** The form as a user with these units sees it (the signed-in user is what `useUnits` reads). */
function renderAs(system: 'metric' | 'us', onSaved: (massG: number) => void) {
  const qc = new QueryClient();
  qc.setQueryData(queryKeys.session.me(), {
    id: 1,
    email: 'tech@demo.test',
    name: 'Tech',
    role: 'technician',
    unitSystem: system,
    units: unitPrefs(system),
    disabled: false,
  });
  render(
    <QueryClientProvider client={qc}>
      <MassForm onSaved={onSaved} />
    </QueryClientProvider>,
  );
}

const save = () => fireEvent.click(screen.getByRole('button', { name: 'Save' }));

describe('NumberField in a form on the toolkit', () => {
  it('labels the box with the user unit and reads a decimal comma, handing the contract grams', async () => {
    const saved = vi.fn();
    renderAs('us', saved);
    fireEvent.change(screen.getByLabelText('Mass (oz)'), { target: { value: '1,5' } });
    save();
    // 1.5 oz × 28.349523125 g/oz (the international avoirdupois ounce, exactly 1/16 of 0.45359237 kg).
    await waitFor(() => expect(saved).toHaveBeenCalledOnce());
    expect(saved.mock.calls[0]![0]).toBeCloseTo(42.5242846875, 10);
  });

  it('puts "Enter a number", the required message and the contract message on the box', async () => {
    const saved = vi.fn();
    renderAs('metric', saved);
    const box = screen.getByLabelText('Mass (g)');
    save();
    expect((await screen.findByRole('alert')).textContent).toBe('Enter the mass');
    fireEvent.change(box, { target: { value: '12 g' } });
    save();
    await waitFor(() => expect(screen.getByRole('alert').textContent).toBe(NOT_A_NUMBER));
    fireEvent.change(box, { target: { value: '-3' } });
    save();
    await waitFor(() => expect(screen.getByRole('alert').textContent).toBe('The mass must be above zero'));
    expect(box.getAttribute('aria-invalid')).toBe('true');
    expect(saved).not.toHaveBeenCalled();
  });
});
