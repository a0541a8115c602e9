import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link, useNavigate, useParams } from 'react-router';
import { acceptNewUserSchema, type AcceptNewUser, type AcceptResult, PASSWORD_MIN } from '../../../../shared/schemas/access';
import { ExpiredLinkPage } from '../../../components/error-pages';
import { ErrorState, Loading } from '../../../components/status';
import { ApiError } from '../../../lib/api-client';
import { useAcceptInvitation, useInvitation } from '../api/invitation';
import { useSession } from '../../../lib/session';
import { usePageTitle } from '../../../lib/page-title';
import { FormAlert, PublicFrame } from './public-frame';

const ROLE_WORDS = { lead: 'classification lead', classifier: 'classifier', researcher: 'researcher' } as const;

/** Where someone lands in a federation: a classifier on their own page. */
const landing = (result: AcceptResult) => `/f/${result.federation.slug}/${result.role === 'classifier' ? 'me' : ''}`;

export function AcceptInvitationPage() {
  const { token = '' } = useParams();
  const invitation = useInvitation(token);
  const accept = useAcceptInvitation(token);
  const session = useSession();
  const navigate = useNavigate();
  const form = useForm<AcceptNewUser>({
    resolver: zodResolver(acceptNewUserSchema),
    defaultValues: { displayName: '', password: '', confirmPassword: '' },
  });
  const { errors } = form.formState;
  usePageTitle(invitation.data ? `Join ${invitation.data.federation.name}` : 'Invitation');

  if (invitation.isPending) return <Loading />;
  if (invitation.error instanceof ApiError && invitation.error.status === 410) return <ExpiredLinkPage />;
  if (accept.error instanceof ApiError && accept.error.status === 410) return <ExpiredLinkPage />;
  if (invitation.error)
    return (
      <PublicFrame>
        <ErrorState
          error={invitation.error}
          what="The invitation"
          retrying={invitation.isFetching}
          onRetry={() => void invitation.refetch()}
        />
      </PublicFrame>
    );

  const offer = invitation.data;
  const done = (result: AcceptResult) => {
    if (result.signedIn) void navigate(landing(result), { replace: true });
    else void navigate(`/sign-in?next=${encodeURIComponent(landing(result))}`, { replace: true });
  };
  const onSubmit = form.handleSubmit((values) => accept.mutateAsync(values).then(done, () => undefined));
  const signedInAsOther = session.data && session.data.user.email !== offer.email;

  return (
    <PublicFrame>
      <section className="card space-y-5" aria-labelledby="invitation-title">
        <h1 id="invitation-title">Join {offer.federation.name}</h1>
        <p>
          You are invited as <strong>{ROLE_WORDS[offer.role]}</strong>
          {offer.classifierCode ? (
            <>
              {' '}
              (roster entry <strong>{offer.classifierCode}</strong>)
            </>
          ) : null}{' '}
          with the address <strong>{offer.email}</strong>.
        </p>
        {signedInAsOther ? (
          <p className="caution">
            You are signed in as {session.data?.user.email}. The invitation is for {offer.email}: accepting it does not change who is signed
            in.
          </p>
        ) : null}
        <FormAlert error={accept.error} />
        {offer.existingUser ? (
          <>
            <p className="text-sm text-muted">This address already has a Panelwise account: accepting adds the federation to it.</p>
            <button
              type="button"
              className="btn btn-primary w-full justify-center"
              disabled={accept.isPending}
              onClick={() => accept.mutateAsync({}).then(done, () => undefined)}
            >
              {accept.isPending ? 'Accepting…' : 'Accept the invitation'}
            </button>
          </>
        ) : (
          <form onSubmit={onSubmit} className="space-y-5" noValidate aria-label="Create your account">
            <input type="email" autoComplete="username" value={offer.email} readOnly hidden />
            <div className="field">
              <label htmlFor="display-name">Your name</label>
              <input
                id="display-name"
                autoComplete="name"
                className="input"
                aria-invalid={errors.displayName ? true : undefined}
                {...form.register('displayName')}
              />
              {errors.displayName ? <p className="field-error">{errors.displayName.message}</p> : null}
            </div>
            <div className="field">
              <label htmlFor="password">Password</label>
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
              <label htmlFor="confirm-password">Repeat the password</label>
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
            <button type="submit" className="btn btn-primary w-full justify-center" disabled={accept.isPending}>
              {accept.isPending ? 'Creating your account…' : 'Accept and create my account'}
            </button>
          </form>
        )}
        <p className="text-xs text-muted">
          Not for you? Close this page; the link stops working in time.{' '}
          <Link to="/sign-in" className="text-harbour underline">
            Sign in
          </Link>
        </p>
      </section>
    </PublicFrame>
  );
}
