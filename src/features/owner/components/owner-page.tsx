import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link, useNavigate } from 'react-router';
import { federationCreateSchema, leadInviteSchema, type FederationCreate, type OwnerFederation } from '../../../../shared/schemas/access';
import { ForbiddenPage } from '../../../components/error-pages';
import { BrandMark } from '../../../components/brand';
import { DataTable, type DataTableColumn } from '../../../components/data-table';
import { z } from 'zod';
import { usePageTitle } from '../../../lib/page-title';
import { useConfirm } from '../../../components/confirm-dialog';
import { QueryState } from '../../../components/query-state';
import { ErrorNotice } from '../../../components/status';
import { formatCount, formatInteger } from '../../../lib/format';
import { useInviteLead } from '../api/invite-lead';
import { OutboxList } from '../../../components/outbox-list';
import { useSession, useSignOut } from '../../../lib/session';
import { useCreateFederation } from '../api/create-federation';
import { useOwnerFederations } from '../api/get-federations';
import { useOwnerOutbox } from '../api/get-outbox';

function CreateFederationForm() {
  const create = useCreateFederation();
  const form = useForm<z.input<typeof federationCreateSchema>, unknown, FederationCreate>({
    resolver: zodResolver(federationCreateSchema),
    defaultValues: { slug: '', name: '', leadEmail: '' },
  });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit((values) =>
    create.mutateAsync(values).then(
      () => form.reset(),
      () => undefined,
    ),
  );
  return (
    <form onSubmit={onSubmit} className="card space-y-4" noValidate aria-labelledby="create-title">
      <h2 id="create-title">Add a federation</h2>
      <p className="text-sm text-muted">Its first classification lead gets an e-mailed invitation; the lead then invites everyone else.</p>
      {create.error ? <ErrorNotice error={create.error} /> : null}
      {create.isSuccess ? (
        <p role="status" className="rounded-lg bg-ok-soft px-3 py-2 text-sm text-ok">
          {create.data.federation.name} is created; {create.data.mailSent ? 'the invitation is sent to' : 'the e-mail could not be sent to'}{' '}
          {create.data.invitation.email}.
        </p>
      ) : null}
      <div className="grid gap-4 sm:grid-cols-3">
        <div className="field">
          <label htmlFor="federation-name">Name</label>
          <input id="federation-name" className="input" aria-invalid={errors.name ? true : undefined} {...form.register('name')} />
          {errors.name ? <p className="field-error">{errors.name.message}</p> : null}
        </div>
        <div className="field">
          <label htmlFor="federation-slug">Short address</label>
          <input
            id="federation-slug"
            className="input"
            aria-describedby="slug-hint"
            aria-invalid={errors.slug ? true : undefined}
            {...form.register('slug')}
          />
          <p id="slug-hint" className="text-xs text-muted">
            Used in links, e.g. gannet-bay
          </p>
          {errors.slug ? <p className="field-error">{errors.slug.message}</p> : null}
        </div>
        <div className="field">
          <label htmlFor="lead-email">First lead's e-mail</label>
          <input
            id="lead-email"
            type="email"
            className="input"
            aria-invalid={errors.leadEmail ? true : undefined}
            {...form.register('leadEmail')}
          />
          {errors.leadEmail ? <p className="field-error">{errors.leadEmail.message}</p> : null}
        </div>
      </div>
      <button type="submit" className="btn btn-primary" disabled={create.isPending}>
        Create and invite the lead
      </button>
    </form>
  );
}

/** Invites a (further) lead to a federation that exists, for one left without a lead or needing another. */
function InviteLeadForm({ federations }: { federations: OwnerFederation[] }) {
  const invite = useInviteLead();
  const { confirm, dialog } = useConfirm();
  const leadless = federations.filter((f) => f.leads === 0);
  const form = useForm<{ slug: string; email: string }>({
    resolver: zodResolver(leadInviteSchema.extend({ slug: z.string().min(1, { message: 'Choose a federation' }) })),
    defaultValues: { slug: leadless[0]?.slug ?? federations[0]?.slug ?? '', email: '' },
  });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit(async ({ slug, email }) => {
    const federation = federations.find((f) => f.slug === slug);
    if (
      federation &&
      federation.pendingInvitations > 0 &&
      !(await confirm({
        title: `Invite ${email} to lead ${federation.name}?`,
        consequence: (
          <p>
            {federation.name} has {formatCount(federation.pendingInvitations, 'pending invitation')}. If one of them is for {email}, the new
            invitation replaces it: the link in the earlier e-mail will stop working.
          </p>
        ),
        confirmLabel: 'Send the invitation',
      }))
    )
      return;
    await invite.mutateAsync({ slug, body: { email } }).then(
      () => form.reset({ slug, email: '' }),
      () => undefined,
    );
  });
  return (
    <form onSubmit={onSubmit} className="card space-y-4" noValidate aria-labelledby="invite-lead-title">
      {dialog}
      <h2 id="invite-lead-title">Invite a lead</h2>
      <p className="text-sm text-muted">
        For a federation that exists: its new classification lead gets an e-mailed invitation that works once, for seven days.
        {leadless.length ? ` Without a lead now: ${leadless.map((f) => f.name).join(', ')}.` : ''}
      </p>
      {invite.error ? <ErrorNotice error={invite.error} /> : null}
      {invite.isSuccess ? (
        <p role="status" className="rounded-lg bg-ok-soft px-3 py-2 text-sm text-ok">
          {invite.data.mailSent
            ? `Invitation sent to ${invite.data.invitation.email}.`
            : `Invitation stored for ${invite.data.invitation.email}, but the e-mail could not be sent.`}
        </p>
      ) : null}
      <div className="grid gap-4 sm:grid-cols-2">
        <div className="field">
          <label htmlFor="invite-lead-federation">Federation</label>
          <select id="invite-lead-federation" className="input" aria-invalid={errors.slug ? true : undefined} {...form.register('slug')}>
            {federations.map((f) => (
              <option key={f.slug} value={f.slug}>
                {f.name}
                {f.leads === 0 ? ' (no lead)' : ''}
              </option>
            ))}
          </select>
          {errors.slug ? <p className="field-error">{errors.slug.message}</p> : null}
        </div>
        <div className="field">
          <label htmlFor="invite-lead-email">Lead's e-mail</label>
          <input
            id="invite-lead-email"
            type="email"
            className="input"
            autoComplete="off"
            aria-invalid={errors.email ? true : undefined}
            {...form.register('email')}
          />
          {errors.email ? <p className="field-error">{errors.email.message}</p> : null}
        </div>
      </div>
      <button type="submit" className="btn btn-primary" disabled={invite.isPending}>
        {invite.isPending ? 'Sending…' : 'Invite the lead'}
      </button>
    </form>
  );
}

/** The site owner's page: federations and their leads, and the local Outbox. */
export function OwnerPage() {
  const session = useSession();
  const signOut = useSignOut();
  const navigate = useNavigate();
  const isOwner = session.data?.user.isOwner === true;
  const federations = useOwnerFederations();
  const outbox = useOwnerOutbox(isOwner && session.data?.localMail === true);
  usePageTitle(isOwner ? 'Federations' : 'Not available to you');
  if (!isOwner) return <ForbiddenPage />;
  const memberOf = new Set(session.data?.memberships.map((m) => m.federation.slug));

  const columns: DataTableColumn<OwnerFederation>[] = [
    {
      key: 'name',
      header: 'Federation',
      cell: (f) =>
        memberOf.has(f.slug) ? (
          <Link to={`/f/${f.slug}`} className="text-harbour underline">
            {f.name}
          </Link>
        ) : (
          f.name
        ),
    },
    { key: 'slug', header: 'Address' },
    {
      key: 'leads',
      header: 'Leads',
      align: 'right',
      cell: (f) => (f.leads === 0 ? <span className="font-semibold text-alert">none</span> : formatInteger(f.leads)),
    },
    { key: 'activeMembers', header: 'Active members', align: 'right' },
    { key: 'pendingInvitations', header: 'Pending invitations', align: 'right' },
  ];

  return (
    <div className="min-h-screen">
      <header className="border-b border-line bg-card">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-x-4 gap-y-2 px-4 py-3">
          <span className="flex items-center gap-2 font-bold tracking-tight">
            <BrandMark size={32} />
            <span className="text-lg">Panelwise</span>
          </span>
          <span className="rounded-full bg-harbour-soft px-2.5 py-1 text-xs font-semibold text-harbour">Site owner</span>
          <button
            type="button"
            className="btn btn-quiet ml-auto min-h-10 py-1.5"
            onClick={() => signOut.mutate(undefined, { onSuccess: () => void navigate('/sign-in', { replace: true }) })}
          >
            Sign out
          </button>
        </div>
      </header>
      <main id="main" className="mx-auto max-w-7xl space-y-8 px-4 py-6">
        <h1>Federations</h1>
        <QueryState query={federations} what="The federations">
          {(rows) => (
            <>
              <DataTable caption="Federations" rows={rows} columns={columns} rowKey={(f) => String(f.id)} />
              {rows.length > 0 ? <InviteLeadForm federations={rows} /> : null}
            </>
          )}
        </QueryState>
        <CreateFederationForm />
        {session.data?.localMail ? (
          <section className="space-y-3" aria-labelledby="outbox-title">
            <h2 id="outbox-title">Outbox</h2>
            <p className="text-sm text-muted">Outside production no e-mail leaves Panelwise: every message is kept here.</p>
            <QueryState query={outbox} what="The Outbox">
              {(messages) => <OutboxList messages={messages} />}
            </QueryState>
          </section>
        ) : null}
      </main>
    </div>
  );
}
