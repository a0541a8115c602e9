import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link, Navigate, useNavigate, useSearchParams } from 'react-router';
import { signInSchema, type SignIn } from '../../../../shared/schemas/session';
import { useSession, useSignIn } from '../../../lib/session';
import { usePageTitle } from '../../../lib/page-title';
import { PublicFrame } from './public-frame';

export function SignInPage() {
  usePageTitle('Sign in');
  const session = useSession();
  const signIn = useSignIn();
  const navigate = useNavigate();
  const [params] = useSearchParams();
  const next = params.get('next');
  const form = useForm<SignIn>({ resolver: zodResolver(signInSchema), defaultValues: { email: '', password: '' } });

  if (session.data) return <Navigate to={next && next.startsWith('/') ? next : '/'} replace />;

  const onSubmit = form.handleSubmit(async (values) => {
    await signIn.mutateAsync(values).then(
      () => navigate(next && next.startsWith('/') ? next : '/', { replace: true }),
      () => undefined,
    );
  });
  const { errors } = form.formState;

  return (
    <PublicFrame>
      <form onSubmit={onSubmit} className="card space-y-5" noValidate aria-labelledby="sign-in-title">
        <h1 id="sign-in-title">Sign in</h1>
        {params.get('reset') === '1' && !signIn.error ? (
          <p role="status" className="rounded-lg bg-ok-soft px-3 py-2 text-sm text-ok">
            Your new password is saved. Sign in with it.
          </p>
        ) : null}
        {signIn.error ? (
          <p role="alert" className="rounded-lg bg-alert-soft px-3 py-2 text-sm text-alert">
            {signIn.error.message}
          </p>
        ) : null}
        <div className="field">
          <label htmlFor="email">E-mail</label>
          <input
            id="email"
            type="email"
            autoComplete="username"
            className="input"
            aria-invalid={errors.email ? true : undefined}
            {...form.register('email')}
          />
          {errors.email ? <p className="field-error">{errors.email.message}</p> : null}
        </div>
        <div className="field">
          <label htmlFor="password">Password</label>
          <input
            id="password"
            type="password"
            autoComplete="current-password"
            className="input"
            aria-invalid={errors.password ? true : undefined}
            {...form.register('password')}
          />
          {errors.password ? <p className="field-error">{errors.password.message}</p> : null}
        </div>
        <button type="submit" className="btn btn-primary w-full justify-center" disabled={signIn.isPending}>
          {signIn.isPending ? 'Signing in…' : 'Sign in'}
        </button>
        <p className="text-sm">
          <Link to="/forgot-password" className="text-harbour underline">
            Forgot your password?
          </Link>
        </p>
      </form>
      <p className="mt-6 text-xs text-muted">
        For a federation's classification programme. Agreement statistics describe consistency between classifiers, not the correctness of
        any athlete's sport class.
      </p>
    </PublicFrame>
  );
}
