import type { ResolverOptions } from 'react-hook-form';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { convertingResolver } from './resolver';
import { NOT_A_NUMBER } from './parse-number';

const options = { shouldUseNativeValidation: false, fields: {} } as unknown as ResolverOptions<never>;
const schema = z.strictObject({ massG: z.number().positive('Mass must be above zero'), readings: z.array(z.strictObject({ kPa: z.number() })) });
type Form = { mass: number | null; readings: { value: number | null }[] };
// Grams typed as kilograms, to see the conversion happen.
const resolver = convertingResolver<Form, typeof schema>(
  schema,
  (v) => ({ massG: v.mass === null ? undefined : v.mass * 1000, readings: v.readings.map((r) => ({ kPa: r.value })) }),
  { massG: 'mass', readings: 'readings' },
  { massG: 'Enter the mass' },
);
const run = (v: Form) => resolver(v, undefined, options as never);

describe('convertingResolver', () => {
  it('converts what was typed and hands the contract output on', async () => {
    expect(await run({ mass: 0.5, readings: [{ value: 12 }] })).toEqual({ values: { massG: 500, readings: [{ kPa: 12 }] }, errors: {} });
  });

  it('names a box whose text is not a number, nested ones included, before asking the contract', async () => {
    const res = await run({ mass: Number.NaN, readings: [{ value: 1 }, { value: Number.NaN }] });
    expect(res.errors).toMatchObject({ mass: { message: NOT_A_NUMBER }, readings: [undefined, { kPa: { message: NOT_A_NUMBER } }] });
  });

  it('says plainly what is missing', async () => {
    expect((await run({ mass: null, readings: [] })).errors).toMatchObject({ mass: { type: 'required', message: 'Enter the mass' } });
  });

  it("puts the contract's own message on the box it came from", async () => {
    expect((await run({ mass: -1, readings: [] })).errors).toMatchObject({ mass: { message: 'Mass must be above zero' } });
  });
});
