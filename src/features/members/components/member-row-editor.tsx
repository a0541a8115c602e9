import { useState } from 'react';
import type { MemberView } from '../../../../shared/schemas/access';
import type { Role } from '../../../../shared/schemas/common';
import { useConfirm } from '../../../components/confirm-dialog';
import { useUpdateMember } from '../api/update-member';
import { ROLE_NAMES } from './role-names';

/** Role (with the roster entry for a classifier) and activity of one member, changed by a lead. */
export function MemberRowEditor({
  federation,
  federationName,
  member,
  unlinked,
  isSelf,
}: {
  federation: string;
  federationName: string;
  member: MemberView;
  unlinked: { code: string; displayName: string }[];
  isSelf: boolean;
}) {
  const update = useUpdateMember(federation);
  const { confirm, dialog } = useConfirm();
  const [role, setRole] = useState<Role>(member.role);
  const [code, setCode] = useState(member.classifierCode ?? '');
  const changed = role !== member.role || (role === 'classifier' && code !== (member.classifierCode ?? ''));
  const codes = member.classifierCode ? [{ code: member.classifierCode, displayName: 'linked now' }, ...unlinked] : unlinked;
  const who = member.displayName;

  return (
    <div className="flex flex-wrap items-center gap-2">
      <label className="sr-only" htmlFor={`role-${member.userId}`}>
        Role of {who}
      </label>
      <select
        id={`role-${member.userId}`}
        className="input min-h-9 py-1 text-sm"
        value={role}
        onChange={(e) => setRole(e.target.value as Role)}
        disabled={!member.active}
      >
        {(['lead', 'classifier', 'researcher'] as const).map((r) => (
          <option key={r} value={r}>
            {ROLE_NAMES[r]}
          </option>
        ))}
      </select>
      {role === 'classifier' ? (
        <>
          <label className="sr-only" htmlFor={`code-${member.userId}`}>
            Roster entry of {who}
          </label>
          <select
            id={`code-${member.userId}`}
            className="input min-h-9 py-1 text-sm"
            value={code}
            onChange={(e) => setCode(e.target.value)}
            disabled={!member.active}
          >
            <option value="">Roster entry…</option>
            {codes.map((c) => (
              <option key={c.code} value={c.code}>
                {c.code}
              </option>
            ))}
          </select>
        </>
      ) : null}
      {changed ? (
        <button
          type="button"
          className="btn btn-primary min-h-9 py-1 text-sm"
          disabled={update.isPending}
          onClick={() =>
            update.mutate({ userId: member.userId, update: { role, ...(role === 'classifier' && code ? { classifierCode: code } : {}) } })
          }
        >
          Save role
        </button>
      ) : null}
      <button
        type="button"
        className="btn btn-quiet min-h-9 py-1 text-sm disabled:opacity-50"
        disabled={update.isPending || (isSelf && member.active)}
        title={isSelf && member.active ? 'You cannot deactivate yourself' : undefined}
        onClick={async () => {
          if (
            member.active &&
            !(await confirm({
              title: `Deactivate ${who}?`,
              consequence: (
                <>
                  <p>
                    {who} ({member.email}) loses {federationName} at once: their next page or request is refused, and any e-mailed link they
                    hold stops working here.
                  </p>
                  <p>Their account, ratings and roster entry stay. You can reactivate them later from this table.</p>
                </>
              ),
              confirmLabel: `Deactivate ${who}`,
            }))
          )
            return;
          update.mutate({ userId: member.userId, update: { active: !member.active } });
        }}
      >
        {member.active ? `Deactivate` : `Reactivate`}
        <span className="sr-only"> {who}</span>
      </button>
      {dialog}
      {update.error ? (
        <p role="alert" className="w-full text-sm text-alert">
          {update.error.message}
        </p>
      ) : null}
    </div>
  );
}
