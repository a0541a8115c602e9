import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import { tokenCreateSchema, type CreatedToken, type TokenCreate, type TokenView } from '../../../../shared/schemas/access';
import { DataTable, type DataTableColumn } from '../../../components/data-table';
import { useConfirm } from '../../../components/confirm-dialog';
import { QueryState } from '../../../components/query-state';
import { ErrorNotice } from '../../../components/status';
import { useCreateApiToken } from '../api/create-api-token';
import { useApiTokens } from '../api/get-api-tokens';
import { useRevokeApiToken } from '../api/revoke-api-token';
import { formatDateTime } from '../../../lib/format';

const SCOPE_WORDS = { read: 'Read figures', import: 'Import decisions' } as const;

function ShownOnce({ created, onDone }: { created: CreatedToken; onDone: () => void }) {
  const [copied, setCopied] = useState(false);
  return (
    <div role="status" className="space-y-3 rounded-lg border border-amber bg-amber-soft p-4">
      <p className="font-semibold">Copy the token for “{created.view.name}” now: it is shown only once.</p>
      <label htmlFor="new-token" className="sr-only">
        New API token
      </label>
      <input
        id="new-token"
        className="input w-full font-mono text-sm"
        readOnly
        value={created.token}
        onFocus={(e) => e.currentTarget.select()}
        data-testid="new-api-token"
      />
      <div className="flex gap-2">
        <button
          type="button"
          className="btn btn-quiet"
          onClick={() => {
            void navigator.clipboard?.writeText(created.token).then(() => setCopied(true));
          }}
        >
          {copied ? 'Copied' : 'Copy'}
        </button>
        <button type="button" className="btn btn-quiet" onClick={onDone}>
          I have stored it
        </button>
      </div>
      <p className="text-sm text-muted">Send it as the header “Authorization: Bearer …”. It works for this federation only.</p>
    </div>
  );
}

export function ApiTokensSection({ federation }: { federation: string }) {
  const tokens = useApiTokens(federation);
  const create = useCreateApiToken(federation);
  const revoke = useRevokeApiToken(federation);
  const [shown, setShown] = useState<CreatedToken | null>(null);
  const { confirm, dialog } = useConfirm();
  const form = useForm<z.input<typeof tokenCreateSchema>, unknown, TokenCreate>({
    resolver: zodResolver(tokenCreateSchema),
    defaultValues: { name: '', scope: 'import' },
  });
  const { errors } = form.formState;
  const onSubmit = form.handleSubmit((values) =>
    create.mutateAsync(values).then(
      (created) => {
        setShown(created);
        form.reset({ name: '', scope: values.scope });
      },
      () => undefined,
    ),
  );

  const columns: DataTableColumn<TokenView>[] = [
    { key: 'name', header: 'System' },
    { key: 'scope', header: 'Scope', cell: (t) => SCOPE_WORDS[t.scope] },
    { key: 'prefix', header: 'Starts with', cell: (t) => <code>{t.prefix}…</code>, sortable: false },
    { key: 'createdAt', header: 'Created', cell: (t) => `${formatDateTime(t.createdAt)}${t.createdBy ? ` by ${t.createdBy}` : ''}` },
    { key: 'lastUsedAt', header: 'Last used', cell: (t) => (t.lastUsedAt ? formatDateTime(t.lastUsedAt) : 'Never') },
    {
      key: 'id',
      header: 'Status',
      sortable: false,
      cell: (t) =>
        t.revokedAt ? (
          <span className="text-muted">Revoked {formatDateTime(t.revokedAt)}</span>
        ) : (
          <button
            type="button"
            className="btn btn-quiet min-h-9 py-1 text-sm"
            disabled={revoke.isPending}
            onClick={async () => {
              const ok = await confirm({
                title: `Revoke the token “${t.name}”?`,
                consequence: (
                  <>
                    <p>
                      Every request that sends the token starting <code>{t.prefix}…</code> is refused from now on: {t.name} can no longer{' '}
                      {t.scope === 'import' ? 'import decisions into' : 'read the figures of'} this federation.
                    </p>
                    <p>This cannot be undone; create a new token and give it to the system if it still needs access.</p>
                  </>
                ),
                confirmLabel: 'Revoke the token',
              });
              if (ok) revoke.mutate(t.id);
            }}
          >
            Revoke<span className="sr-only"> the token {t.name}</span>
          </button>
        ),
    },
  ];

  return (
    <section className="space-y-4" aria-labelledby="tokens-title">
      {dialog}
      <h2 id="tokens-title">API tokens</h2>
      <p className="text-sm text-muted">
        For the federation's own systems (for example its registration system): a token reads figures or imports decisions for this
        federation only, and never signs anyone in.
      </p>
      <form onSubmit={onSubmit} className="card flex flex-wrap items-end gap-4" noValidate aria-label="Create an API token">
        <div className="field">
          <label htmlFor="token-name">System</label>
          <input id="token-name" className="input" aria-invalid={errors.name ? true : undefined} {...form.register('name')} />
          {errors.name ? <p className="field-error">{errors.name.message}</p> : null}
        </div>
        <div className="field">
          <label htmlFor="token-scope">Scope</label>
          <select id="token-scope" className="input" {...form.register('scope')}>
            <option value="import">{SCOPE_WORDS.import}</option>
            <option value="read">{SCOPE_WORDS.read}</option>
          </select>
        </div>
        <button type="submit" className="btn btn-primary" disabled={create.isPending}>
          Create a token
        </button>
        {create.error ? <ErrorNotice error={create.error} /> : null}
      </form>
      {shown ? <ShownOnce created={shown} onDone={() => setShown(null)} /> : null}
      {revoke.error ? <ErrorNotice error={revoke.error} /> : null}
      <QueryState query={tokens} what="The API tokens">
        {(rows) => (
          <DataTable
            caption="API tokens"
            layout="stack"
            rows={rows}
            columns={columns}
            emptyText="No API tokens yet."
            rowKey={(t) => String(t.id)}
          />
        )}
      </QueryState>
    </section>
  );
}
