import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import {
  invitationAcceptSchema,
  passwordResetConfirmSchema,
  passwordResetRequestSchema,
  type InvitationAcceptInput,
  type InvitationPreview,
  type PasswordResetConfirmInput,
  type PasswordResetRequestInput,
} from '../../../../shared/schemas/auth';
import { Field, FormError } from '../../../components/ui/field';
import { applyServerErrors } from '../../../lib/form-errors';
import { useAcceptInvitation, useConfirmPasswordReset, useRequestPasswordReset } from '../api/use-auth-mutations';
import { AuthFrame } from './auth-frame';
import { invitationQuery } from '../api/auth-queries';
import { Loading } from '../../../components/ui/page';
import { ROLE_LABELS } from '../../../../shared/constants/roles';
import { paths } from '../../../config/paths';

export function ForgotPasswordScreen() {
  const request = useRequestPasswordReset();
  const [sent, setSent] = useState(false);
  const form = useForm<PasswordResetRequestInput>({ resolver: zodResolver(passwordResetRequestSchema), defaultValues: { email: '' } });
  const onSubmit = form.handleSubmit(async (values) => {
    try {
      await request.mutateAsync(values);
      setSent(true);
    } catch (err) {
      applyServerErrors(err, form.setError, ['email']);
    }
  });
  return (
    <AuthFrame title="Reset your password">
      {sent ? (
        <p role="status">If that address belongs to a user, a reset link is on its way. It works once, for one hour.</p>
      ) : (
        <form onSubmit={onSubmit} noValidate aria-label="Ask for a reset link">
          <FormError message={form.formState.errors.root?.message} />
          <Field label="E-mail" type="email" autoComplete="username" registration={form.register('email')} error={form.formState.errors.email?.message} />
          <button className="btn-primary" type="submit" disabled={form.formState.isSubmitting}>
            Send the link
          </button>
        </form>
      )}
      <p className="mt-4 text-sm">
        <Link to={paths.signIn.href()}>Back to sign-in</Link>
      </p>
    </AuthFrame>
  );
}

export function ResetPasswordScreen() {
  const [params] = useSearchParams();
  const confirm = useConfirmPasswordReset();
  const [done, setDone] = useState(false);
  const form = useForm<PasswordResetConfirmInput>({
    resolver: zodResolver(passwordResetConfirmSchema),
    defaultValues: { token: params.get('token') ?? '', password: '' },
  });
  const onSubmit = form.handleSubmit(async (values) => {
    try {
      await confirm.mutateAsync(values);
      setDone(true);
    } catch (err) {
      applyServerErrors(err, form.setError, ['password']);
    }
  });
  const { errors } = form.formState;
  return (
    <AuthFrame title="Choose a new password">
      {done ? (
        <p role="status">
          Your password is changed. <Link to={paths.signIn.href()}>Sign in</Link>
        </p>
      ) : (
        <form onSubmit={onSubmit} noValidate aria-label="Choose a new password">
          <FormError message={errors.root?.message ?? errors.token?.message} />
          <Field
            label="New password"
            type="password"
            autoComplete="new-password"
            hint="At least 12 characters; a short sentence is easy to remember."
            registration={form.register('password')}
            error={errors.password?.message}
          />
          <button className="btn-primary" type="submit" disabled={form.formState.isSubmitting}>
            Save the password
          </button>
        </form>
      )}
    </AuthFrame>
  );
}

export function AcceptInvitationScreen() {
  const [params] = useSearchParams();
  const token = params.get('token') ?? '';
  const invitation = useQuery({ ...invitationQuery(token), enabled: token.length >= 20 });
  if (token.length >= 20 && invitation.isPending) {
    return (
      <AuthFrame title="Join the shop's Lumenbook">
        <Loading />
      </AuthFrame>
    );
  }
  return <AcceptInvitationForm token={token} invitation={invitation.data ?? null} invalid={invitation.isError || token.length < 20} />;
}

function AcceptInvitationForm({ token, invitation, invalid }: { token: string; invitation: InvitationPreview | null; invalid: boolean }) {
  const accept = useAcceptInvitation();
  const navigate = useNavigate();
  const form = useForm<InvitationAcceptInput>({
    resolver: zodResolver(invitationAcceptSchema),
    // The name the admin typed, which the newcomer may correct.
    defaultValues: { token, password: '', name: invitation?.name ?? '' },
  });
  const onSubmit = form.handleSubmit(async (values) => {
    try {
      await accept.mutateAsync(values);
      navigate(paths.bench.href(), { replace: true });
    } catch (err) {
      applyServerErrors(err, form.setError, ['password', 'name']);
    }
  });
  const { errors } = form.formState;
  return (
    <AuthFrame title="Join the shop's Lumenbook">
      {invitation ? (
        <p className="mb-4 text-sm text-ink-soft">
          This link invites {invitation.email} as {ROLE_LABELS[invitation.role].toLowerCase()}. Check your name and choose a password.
        </p>
      ) : invalid ? (
        <p className="mb-4 text-sm text-margin" role="alert">
          This invitation link is not valid any more (it works once and expires after a few days); ask the shop's admin for a new one.
        </p>
      ) : null}
      <form onSubmit={onSubmit} noValidate aria-label="Accept the invitation">
        <FormError message={errors.root?.message ?? errors.token?.message} />
        <Field label="Your name" autoComplete="name" registration={form.register('name')} error={errors.name?.message} />
        <Field
          label="Password"
          type="password"
          autoComplete="new-password"
          hint="At least 12 characters."
          registration={form.register('password')}
          error={errors.password?.message}
        />
        <button className="btn-primary" type="submit" disabled={form.formState.isSubmitting}>
          Set the password and sign in
        </button>
      </form>
    </AuthFrame>
  );
}
