import { Link } from 'react-router';
import type { InvitationView, MemberView } from '../../../../shared/schemas/access';
import { useCurrentFederation } from '../../../lib/use-federation';
import { DataTable, type DataTableColumn } from '../../../components/data-table';
import { usePageTitle } from '../../../lib/page-title';
import { useConfirm } from '../../../components/confirm-dialog';
import { QueryState } from '../../../components/query-state';
import { ErrorNotice } from '../../../components/status';
import { useSession } from '../../../lib/session';
import { useMembers } from '../api/get-members';
import { useRevokeInvitation } from '../api/revoke-invitation';
import { ApiTokensSection } from './api-tokens-section';
import { formatDateTime } from '../../../lib/format';
import { ROLE_NAMES } from './role-names';
import { InviteForm } from './invite-form';
import { MemberRowEditor } from './member-row-editor';

/** A lead's page of the federation's people and systems. */
export function MembersPage() {
  const { federation } = useCurrentFederation();
  const session = useSession();
  const members = useMembers(federation.slug);
  const revokeInvitation = useRevokeInvitation(federation.slug);
  const me = session.data?.user.id;
  const { confirm, dialog } = useConfirm();
  usePageTitle('Members');

  if (members.isPending || members.isError)
    return (
      <QueryState query={members} what="The members">
        {() => null}
      </QueryState>
    );
  const { unlinkedClassifiers } = members.data;

  const memberColumns: DataTableColumn<MemberView>[] = [
    { key: 'displayName', header: 'Name' },
    { key: 'email', header: 'E-mail' },
    { key: 'role', header: 'Role', cell: (m) => ROLE_NAMES[m.role] },
    { key: 'classifierCode', header: 'Roster entry', cell: (m) => m.classifierCode ?? '—' },
    { key: 'active', header: 'Status', cell: (m) => (m.active ? 'Active' : <span className="text-alert">Deactivated</span>) },
    {
      key: 'userId',
      header: 'Change',
      sortable: false,
      cell: (m) => (
        <MemberRowEditor
          federation={federation.slug}
          federationName={federation.name}
          member={m}
          unlinked={unlinkedClassifiers}
          isSelf={m.userId === me}
        />
      ),
    },
  ];
  const invitationColumns: DataTableColumn<InvitationView>[] = [
    { key: 'email', header: 'E-mail' },
    { key: 'role', header: 'Role', cell: (i) => `${ROLE_NAMES[i.role]}${i.classifierCode ? ` (${i.classifierCode})` : ''}` },
    { key: 'createdAt', header: 'Sent', cell: (i) => `${formatDateTime(i.createdAt)}${i.invitedBy ? ` by ${i.invitedBy}` : ''}` },
    { key: 'expiresAt', header: 'Expires', cell: (i) => formatDateTime(i.expiresAt) },
    {
      key: 'id',
      header: 'Revoke',
      sortable: false,
      cell: (i) => (
        <button
          type="button"
          className="btn btn-quiet min-h-9 py-1 text-sm"
          disabled={revokeInvitation.isPending}
          onClick={async () => {
            const ok = await confirm({
              title: `Revoke the invitation of ${i.email}?`,
              consequence: (
                <p>
                  The link in the e-mail sent {formatDateTime(i.createdAt)} stops working at once. You can invite the address again later.
                </p>
              ),
              confirmLabel: 'Revoke the invitation',
            });
            if (ok) revokeInvitation.mutate(i.id);
          }}
        >
          Revoke<span className="sr-only"> the invitation of {i.email}</span>
        </button>
      ),
    },
  ];

  return (
    <div className="space-y-8">
      <div className="flex flex-wrap items-baseline justify-between gap-3">
        <div>
          <h1>Members and access</h1>
          <p className="mt-1 text-muted">
            Who may use {federation.name} in Panelwise, in which role, and which systems may send or read data.
          </p>
        </div>
        {session.data?.localMail ? (
          <Link to="../outbox" relative="path" className="btn btn-quiet">
            Outbox (e-mail kept locally)
          </Link>
        ) : null}
      </div>
      {dialog}
      <InviteForm federation={federation.slug} unlinked={unlinkedClassifiers} pending={members.data.invitations} />
      <section className="space-y-3" aria-labelledby="members-title">
        <h2 id="members-title">Members</h2>
        <p className="text-sm text-muted">
          A change applies on the member's next request; a deactivated member loses this federation at once.
        </p>
        <DataTable
          caption="Members"
          layout="stack"
          rows={members.data.members}
          columns={memberColumns}
          filterable
          rowKey={(m) => String(m.userId)}
        />
      </section>
      <section className="space-y-3" aria-labelledby="invitations-title">
        <h2 id="invitations-title">Pending invitations</h2>
        {revokeInvitation.error ? <ErrorNotice error={revokeInvitation.error} /> : null}
        <DataTable
          caption="Pending invitations"
          layout="stack"
          rows={members.data.invitations}
          columns={invitationColumns}
          emptyText="No pending invitations."
          rowKey={(i) => String(i.id)}
        />
      </section>
      <ApiTokensSection federation={federation.slug} />
    </div>
  );
}
