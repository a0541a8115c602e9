import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link } from 'react-router';
import { resetRequestSchema, type ResetRequest } from '../../../../shared/schemas/access';
import { useRequestPasswordReset } from '../api/password-reset';
import { usePageTitle } from '../../../lib/page-title';
import { FormAlert, PublicFrame } from './public-frame';

export function ForgotPasswordPage() {
  usePageTitle('Forgot your password');
  const request = useRequestPasswordReset();
  const form = useForm<ResetRequest>({ resolver: zodResolver(resetRequestSchema), defaultValues: { email: '' } });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit((values) =>
    request.mutateAsync(values).then(
      () => undefined,
      () => undefined,
    ),
  );

  return (
    <PublicFrame>
      {request.isSuccess ? (
        <section className="card space-y-4" aria-labelledby="forgot-title">
          <h1 id="forgot-title">Check your e-mail</h1>
          <p role="status">{request.data.message} The link works once, for an hour.</p>
          <Link to="/sign-in" className="btn btn-quiet">
            Back to sign in
          </Link>
        </section>
      ) : (
        <form onSubmit={onSubmit} className="card space-y-5" noValidate aria-labelledby="forgot-title">
          <h1 id="forgot-title">Forgot your password?</h1>
          <p className="text-sm text-muted">Enter the e-mail address of your account. We send a link to choose a new password.</p>
          <FormAlert error={request.error} />
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
          <button type="submit" className="btn btn-primary w-full justify-center" disabled={request.isPending}>
            {request.isPending ? 'Sending…' : 'Send the link'}
          </button>
          <p className="text-sm">
            <Link to="/sign-in" className="text-harbour underline">
              Back to sign in
            </Link>
          </p>
        </form>
      )}
    </PublicFrame>
  );
}
