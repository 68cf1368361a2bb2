import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import { useNavigate } from 'react-router-dom';
import { createFindingSchema, type CreateFindingInput } from '../../../../shared/schemas/findings';
import { Field, FormError } from '../../../components/ui/field';
import { Page } from '../../../components/ui/page';
import { paths } from '../../../config/paths';
import { applyServerErrors } from '../../../lib/form-errors';
import { useCreateFinding } from '../api/use-finding-mutations';

/** Starts a finding with its title; the rest is written on the finding's own page, which saves as you type. */
export function NewFindingScreen() {
  const navigate = useNavigate();
  const create = useCreateFinding();
  const form = useForm<z.input<typeof createFindingSchema>, unknown, CreateFindingInput>({
    resolver: zodResolver(createFindingSchema),
    defaultValues: { title: '', bodyMd: '', trialIds: [], speciesIds: [], resinIds: [] },
  });
  const onSubmit = form.handleSubmit(async (values) => {
    try {
      const f = await create.mutateAsync(values);
      void navigate(paths.finding.href({ id: f.id }));
    } catch (err) {
      applyServerErrors(err, form.setError, ['title']);
    }
  });
  return (
    <Page title="Write a finding">
      <form className="sheet max-w-2xl p-6" onSubmit={onSubmit} noValidate>
        <FormError message={form.formState.errors.root?.message} />
        <Field label="Title" registration={form.register('title')} error={form.formState.errors.title?.message} hint="What the trial showed, in one line." />
        <button type="submit" className="btn-primary" disabled={form.formState.isSubmitting}>
          Start the draft
        </button>
      </form>
    </Page>
  );
}
