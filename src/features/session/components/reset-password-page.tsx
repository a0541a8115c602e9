import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { useNavigate, useParams } from 'react-router';
import { resetPasswordSchema, type ResetPassword, PASSWORD_MIN } from '../../../../shared/schemas/access';
import { ExpiredLinkPage } from '../../../components/error-pages';
import { ErrorState, Loading } from '../../../components/status';
import { ApiError } from '../../../lib/api-client';
import { usePasswordReset, useResetPassword } from '../api/password-reset';
import { usePageTitle } from '../../../lib/page-title';
import { FormAlert, PublicFrame } from './public-frame';

export function ResetPasswordPage() {
  usePageTitle('Choose a new password');
  const { token = '' } = useParams();
  const reset = usePasswordReset(token);
  const save = useResetPassword(token);
  const navigate = useNavigate();
  const form = useForm<ResetPassword>({ resolver: zodResolver(resetPasswordSchema), defaultValues: { password: '', confirmPassword: '' } });
  const { errors } = form.formState;

  if (reset.isPending) return <Loading />;
  if (reset.error instanceof ApiError && reset.error.status === 410) return <ExpiredLinkPage />;
  if (save.error instanceof ApiError && save.error.status === 410) return <ExpiredLinkPage />;
  if (reset.error)
    return (
      <PublicFrame>
        <ErrorState error={reset.error} what="The link" retrying={reset.isFetching} onRetry={() => void reset.refetch()} />
      </PublicFrame>
    );

  const onSubmit = form.handleSubmit((values) =>
    save.mutateAsync(values).then(
      () => navigate('/sign-in?reset=1', { replace: true }),
      () => undefined,
    ),
  );

  return (
    <PublicFrame>
      <form onSubmit={onSubmit} className="card space-y-5" noValidate aria-labelledby="reset-title">
        <h1 id="reset-title">Choose a new password</h1>
        <p className="text-sm text-muted">
          For <strong className="text-ink">{reset.data.email}</strong>. Every other session of this account is signed out.
        </p>
        <FormAlert error={save.error} />
        <input type="email" autoComplete="username" value={reset.data.email} readOnly hidden />
        <div className="field">
          <label htmlFor="password">New password</label>
          <input
            id="password"
            type="password"
            autoComplete="new-password"
            className="input"
            aria-describedby="password-hint"
            aria-invalid={errors.password ? true : undefined}
            {...form.register('password')}
          />
          <p id="password-hint" className="text-xs text-muted">
            At least {PASSWORD_MIN} characters.
          </p>
          {errors.password ? <p className="field-error">{errors.password.message}</p> : null}
        </div>
        <div className="field">
          <label htmlFor="confirm-password">Repeat the new password</label>
          <input
            id="confirm-password"
            type="password"
            autoComplete="new-password"
            className="input"
            aria-invalid={errors.confirmPassword ? true : undefined}
            {...form.register('confirmPassword')}
          />
          {errors.confirmPassword ? <p className="field-error">{errors.confirmPassword.message}</p> : null}
        </div>
        <button type="submit" className="btn btn-primary w-full justify-center" disabled={save.isPending}>
          {save.isPending ? 'Saving…' : 'Save the new password'}
        </button>
      </form>
    </PublicFrame>
  );
}
