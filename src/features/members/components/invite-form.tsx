import { zodResolver } from '@hookform/resolvers/zod';
import { useForm, useWatch } from 'react-hook-form';
import type { z } from 'zod';
import { inviteSchema, type Invite } from '../../../../shared/schemas/access';
import { useInviteMember } from '../api/invite-member';
import { ROLE_NAMES } from './role-names';

type InviteInput = z.input<typeof inviteSchema>;

export function InviteForm({ federation, unlinked }: { federation: string; unlinked: { code: string; displayName: string }[] }) {
  const invite = useInviteMember(federation);
  const form = useForm<InviteInput, unknown, Invite>({ resolver: zodResolver(inviteSchema), defaultValues: { email: '', role: 'classifier', classifierCode: undefined } });
  const role = useWatch({ control: form.control, name: 'role' });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit((values) =>
    invite.mutateAsync(values).then(
      () => form.reset({ email: '', role: values.role, classifierCode: undefined }),
      () => undefined,
    ),
  );

  return (
    <form onSubmit={onSubmit} className="card space-y-4" noValidate aria-labelledby="invite-title">
      <h2 id="invite-title">Invite someone</h2>
      <p className="text-sm text-muted">They get an e-mail with a link that works once, for seven days. A classifier is linked to their roster entry and sees only their own figures.</p>
      {invite.error ? (
        <p role="alert" className="rounded-lg bg-alert-soft px-3 py-2 text-sm text-alert">
          {invite.error.message}
        </p>
      ) : null}
      {invite.isSuccess ? (
        <p role="status" className="rounded-lg bg-ok-soft px-3 py-2 text-sm text-ok">
          {invite.data.mailSent ? `Invitation sent to ${invite.data.invitation.email}.` : `Invitation stored for ${invite.data.invitation.email}, but the e-mail could not be sent: revoke it and try again later.`}
        </p>
      ) : null}
      <div className="grid gap-4 sm:grid-cols-3">
        <div className="field">
          <label htmlFor="invite-email">E-mail</label>
          <input id="invite-email" type="email" className="input" autoComplete="off" aria-invalid={errors.email ? true : undefined} {...form.register('email')} />
          {errors.email ? <p className="field-error">{errors.email.message}</p> : null}
        </div>
        <div className="field">
          <label htmlFor="invite-role">Role</label>
          <select id="invite-role" className="input" {...form.register('role')}>
            {(['lead', 'classifier', 'researcher'] as const).map((r) => (
              <option key={r} value={r}>
                {ROLE_NAMES[r]}
              </option>
            ))}
          </select>
        </div>
        {role === 'classifier' ? (
          <div className="field">
            <label htmlFor="invite-classifier">Roster entry</label>
            <select
              id="invite-classifier"
              className="input"
              aria-invalid={errors.classifierCode ? true : undefined}
              {...form.register('classifierCode', { setValueAs: (v: string) => (v ? v : undefined) })}
            >
              <option value="">Choose…</option>
              {unlinked.map((c) => (
                <option key={c.code} value={c.code}>
                  {c.code} · {c.displayName}
                </option>
              ))}
            </select>
            {errors.classifierCode ? <p className="field-error">{errors.classifierCode.message}</p> : null}
          </div>
        ) : null}
      </div>
      <button type="submit" className="btn btn-primary" disabled={invite.isPending}>
        {invite.isPending ? 'Sending…' : 'Send the invitation'}
      </button>
    </form>
  );
}
