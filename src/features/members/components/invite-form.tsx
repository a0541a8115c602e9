import { zodResolver } from '@hookform/resolvers/zod';
import { useForm, useWatch } from 'react-hook-form';
import type { z } from 'zod';
import { inviteSchema, type Invite, type InvitationView } from '../../../../shared/schemas/access';
import { useConfirm, type ConfirmOptions } from '../../../components/confirm-dialog';
import { formatDateTime } from '../../../lib/format';
import { useInviteMember } from '../api/invite-member';
import { ROLE_NAMES } from './role-names';

type InviteInput = z.input<typeof inviteSchema>;

/** Sending again to an address with a pending invitation replaces it: its link stops working. */
export function replaceInvitationQuestion(earlier: InvitationView): ConfirmOptions {
  return {
    title: `Replace the pending invitation of ${earlier.email}?`,
    consequence: (
      <>
        <p>
          {earlier.email} already has an invitation as {ROLE_NAMES[earlier.role].toLowerCase()}
          {earlier.classifierCode ? ` (${earlier.classifierCode})` : ''}, sent {formatDateTime(earlier.createdAt)}. A new invitation
          replaces it: the link in the earlier e-mail will stop working, and only the new e-mail’s link will open.
        </p>
      </>
    ),
    confirmLabel: 'Send a new invitation',
    cancelLabel: 'Keep the earlier one',
  };
}

export function InviteForm({
  federation,
  unlinked,
  pending = [],
}: {
  federation: string;
  unlinked: { code: string; displayName: string }[];
  pending?: InvitationView[];
}) {
  const invite = useInviteMember(federation);
  const { confirm, dialog } = useConfirm();
  const form = useForm<InviteInput, unknown, Invite>({
    resolver: zodResolver(inviteSchema),
    defaultValues: { email: '', role: 'classifier', classifierCode: undefined },
  });
  const role = useWatch({ control: form.control, name: 'role' });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit(async (values) => {
    const earlier = pending.find((i) => i.email.toLowerCase() === values.email.toLowerCase());
    if (earlier && !(await confirm(replaceInvitationQuestion(earlier)))) return;
    await invite.mutateAsync(values).then(
      () => form.reset({ email: '', role: values.role, classifierCode: undefined }),
      () => undefined,
    );
  });

  return (
    <form onSubmit={onSubmit} className="card space-y-4" noValidate aria-labelledby="invite-title">
      {dialog}
      <h2 id="invite-title">Invite someone</h2>
      <p className="text-sm text-muted">
        They get an e-mail with a link that works once, for seven days. A classifier is linked to their roster entry and sees only their own
        figures.
      </p>
      {invite.error ? (
        <p role="alert" className="rounded-lg bg-alert-soft px-3 py-2 text-sm text-alert">
          {invite.error.message}
        </p>
      ) : null}
      {invite.isSuccess ? (
        <p role="status" className="rounded-lg bg-ok-soft px-3 py-2 text-sm text-ok">
          {invite.data.mailSent
            ? `Invitation sent to ${invite.data.invitation.email}.`
            : `Invitation stored for ${invite.data.invitation.email}, but the e-mail could not be sent: revoke it and try again later.`}
        </p>
      ) : null}
      <div className="grid gap-4 sm:grid-cols-3">
        <div className="field">
          <label htmlFor="invite-email">E-mail</label>
          <input
            id="invite-email"
            type="email"
            className="input"
            autoComplete="off"
            aria-invalid={errors.email ? true : undefined}
            {...form.register('email')}
          />
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
