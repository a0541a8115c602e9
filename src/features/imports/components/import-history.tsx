import { useState } from 'react';
import type { ImportView } from '../../../../shared/schemas/imports';
import { DataTable, type DataTableColumn } from '../../../components/data-table';
import { ErrorNotice, Loading } from '../../../components/status';
import { ApiError } from '../../../lib/api-client';
import { useImports } from '../api/list-imports';
import { useRevertImport } from '../api/revert-import';

const number = new Intl.NumberFormat('en');
const when = (iso: string) => iso.replace('T', ' ').slice(0, 16);

const STATUS_WORDS: Record<ImportView['status'], string> = {
  staged: 'Checked, not committed',
  committed: 'Committed',
  reverted: 'Reverted',
  discarded: 'Discarded',
  expired: 'Expired (never committed)',
};
const SOURCE_WORDS: Record<ImportView['source'], string> = { csv: 'CSV upload', api: 'Batch API', seed: 'Demo data' };

/** "6 new, 1 changed" for a kind of record. */
function summary(view: ImportView): string {
  const c = view.counts;
  if (!c?.assessments || !c.ratings) return '—';
  const part = (label: string, x: { new: number; changed: number }) =>
    `${number.format(x.new)} new${x.changed ? `, ${number.format(x.changed)} changed` : ''} ${label}`;
  return `${part('assessments', c.assessments)}; ${part('ratings', c.ratings)}`;
}

/** The import history, newest first, with a revert (after confirmation) for the latest commit. */
export function ImportHistory({ federation }: { federation: string }) {
  const imports = useImports(federation);
  const revert = useRevertImport(federation);
  const [confirming, setConfirming] = useState<ImportView | null>(null);
  const [message, setMessage] = useState<string | null>(null);

  const columns: DataTableColumn<ImportView>[] = [
    { key: 'id', header: 'Import', align: 'right', cell: (v) => `#${v.id}` },
    { key: 'createdAt', header: 'When', cell: (v) => when(v.committedAt ?? v.createdAt), csv: (v) => v.committedAt ?? v.createdAt },
    { key: 'by', header: 'Who', cell: (v) => v.by ?? '—' },
    { key: 'source', header: 'Source', cell: (v) => SOURCE_WORDS[v.source] },
    { key: 'fileName', header: 'File', cell: (v) => v.fileName ?? '—' },
    { key: 'counts', header: 'Counts', sortable: false, cell: summary, csv: summary },
    {
      key: 'status',
      header: 'Status',
      csv: (v) => STATUS_WORDS[v.status] + (v.note ? ` (${v.note})` : ''),
      cell: (v) => (
        <>
          {STATUS_WORDS[v.status] + (v.revertedAt ? ` ${when(v.revertedAt)}` : '')}
          {v.note ? <span className="block text-xs text-muted">{v.note}</span> : null}
        </>
      ),
    },
    {
      key: 'revertable',
      header: 'Revert',
      sortable: false,
      csv: (v) => (v.revertable ? 'yes' : (v.revertBlockedBy ?? '')),
      cell: (v) =>
        v.revertable ? (
          <button
            type="button"
            className="btn btn-quiet min-h-9 py-1"
            onClick={() => {
              setMessage(null);
              setConfirming(v);
            }}
            aria-label={`Revert import #${v.id}`}
          >
            Revert…
          </button>
        ) : v.status === 'committed' ? (
          <span className="text-xs text-muted">{v.revertBlockedBy}</span>
        ) : (
          '—'
        ),
    },
  ];

  return (
    <section aria-labelledby="import-history" className="space-y-3">
      <h2 id="import-history">Import history</h2>
      {confirming ? (
        <div
          role="alertdialog"
          aria-labelledby="revert-title"
          aria-describedby="revert-text"
          className="card space-y-3 border-amber bg-amber-soft"
        >
          <h3 id="revert-title">Revert import #{confirming.id}?</h3>
          <p id="revert-text">
            This removes exactly what the import added ({summary(confirming)}) and restores the records it changed to what they were before.
            The figures of the federation change with it.
          </p>
          <div className="flex gap-3">
            <button
              type="button"
              className="btn btn-primary"
              disabled={revert.isPending}
              onClick={() =>
                revert.mutate(confirming.id, {
                  onSuccess: (view) => {
                    setConfirming(null);
                    setMessage(`Import #${view.id} was reverted.`);
                  },
                  onError: (error) => setMessage(error instanceof ApiError ? error.message : 'The import was not reverted.'),
                })
              }
            >
              {revert.isPending ? 'Reverting…' : 'Revert import'}
            </button>
            <button type="button" className="btn btn-quiet" onClick={() => setConfirming(null)} disabled={revert.isPending}>
              Cancel
            </button>
          </div>
        </div>
      ) : null}
      <p role="status" className="text-sm">
        {message}
      </p>
      {imports.isPending ? (
        <Loading />
      ) : imports.error ? (
        <ErrorNotice error={imports.error} />
      ) : (
        <DataTable
          caption="Import history"
          rows={imports.data.imports}
          columns={columns}
          rowKey={(v) => String(v.id)}
          pageSize={10}
          csvFileName="import-history.csv"
          emptyText="No imports yet."
        />
      )}
    </section>
  );
}
