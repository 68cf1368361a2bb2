import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link, useLocation, useNavigate } from 'react-router-dom';
import { loginSchema, type LoginInput } from '../../../../shared/schemas/auth';
import { Field, FormError } from '../../../components/ui/field';
import { applyServerErrors } from '../../../lib/form-errors';
import { useSignIn } from '../api/use-auth-mutations';
import { AuthFrame } from './auth-frame';
import { paths } from '../../../config/paths';

export function SignInScreen() {
  const signIn = useSignIn();
  const navigate = useNavigate();
  const location = useLocation();
  const from = (location.state as { from?: string } | null)?.from ?? '/';
  const form = useForm<LoginInput>({ resolver: zodResolver(loginSchema), defaultValues: { email: '', password: '' } });
  const { errors, isSubmitting } = form.formState;

  const onSubmit = form.handleSubmit(async (values) => {
    try {
      await signIn.mutateAsync(values);
      navigate(from, { replace: true });
    } catch (err) {
      applyServerErrors(err, form.setError, ['email', 'password']);
    }
  });

  return (
    <AuthFrame title="Sign in">
      <form onSubmit={onSubmit} noValidate aria-label="Sign in">
        <FormError message={errors.root?.message} />
        <Field label="E-mail" type="email" autoComplete="username" registration={form.register('email')} error={errors.email?.message} />
        <Field label="Password" type="password" autoComplete="current-password" registration={form.register('password')} error={errors.password?.message} />
        <div className="flex items-center justify-between">
          <button type="submit" className="btn-primary" disabled={isSubmitting}>
            {isSubmitting ? 'Signing in…' : 'Sign in'}
          </button>
          <Link to={paths.forgotPassword.href()}>Forgot your password?</Link>
        </div>
      </form>
    </AuthFrame>
  );
}
