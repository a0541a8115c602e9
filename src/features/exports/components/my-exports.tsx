import { QueryState } from '../../../components/query-state';
import { DataTable, type DataTableColumn } from '../../../components/data-table';
import type { ExportView } from '../../../../shared/schemas/exports';
import { ASSESSMENT_KIND_LABELS } from '../../../../shared/schemas/common';
import { useMyExports } from '../api/list-exports';
import { ExportFiles } from './export-files';
import { formatDateTime, formatEventLevel, formatInteger, formatNumber, formatSeason } from '../../../lib/format';

type Row = ExportView & { scopeText: string; rows: number; studyName: string };

const COLUMNS: DataTableColumn<Row>[] = [
  { key: 'id', header: 'Export', align: 'right' },
  { key: 'createdAt', header: 'Built', cell: (r) => formatDateTime(r.createdAt) },
  { key: 'scopeText', header: 'Scope' },
  { key: 'studyName', header: 'Study' },
  { key: 'rows', header: 'Rows', align: 'right', cell: (r) => formatInteger(r.rows) },
  {
    key: 'storedBytes',
    header: 'Kept (compressed)',
    align: 'right',
    cell: (r) => (r.expired ? '—' : `${formatNumber(r.storedBytes / 1024 / 1024, 1)} MB`),
  },
  { key: 'expiresAt', header: 'Available until', cell: (r) => (r.expired ? 'Expired' : formatDateTime(r.expiresAt)) },
  { key: 'files', header: 'Download', sortable: false, cell: (r) => <ExportFiles view={r} /> },
];

/** The caller's own exports, with re-download links for seven days. */
export function MyExports({ federation }: { federation: string }) {
  const exports = useMyExports(federation);
  if (exports.isPending || exports.isError)
    return (
      <QueryState query={exports} loadingLabel="Loading your exports…" what="Your exports">
        {() => null}
      </QueryState>
    );
  const rows: Row[] = exports.data.map((e) => ({
    ...e,
    rows: e.counts.rows,
    studyName: e.study?.name ?? '—',
    scopeText: `${e.request.scope.seasons.map(formatSeason).join(', ')} · ${e.request.scope.eventLevels.map(formatEventLevel).join(', ')} · ${e.request.scope.kinds.map((k) => ASSESSMENT_KIND_LABELS[k] ?? k).join(', ')} · ${e.request.scope.categories.join(', ')} · dates by ${e.request.dateMode}`,
  }));
  return (
    <section className="space-y-3" aria-labelledby="my-exports-title">
      <h2 id="my-exports-title">My exports</h2>
      <p className="text-sm text-muted">
        Each export can be downloaded again, by you only, for seven days after it was built; its files then leave the server. The lead sets
        how many exports a researcher may make a day and how many megabytes of files they may keep.
      </p>
      <DataTable
        caption="My exports"
        rows={rows}
        columns={COLUMNS}
        rowKey={(r) => String(r.id)}
        emptyText="You have not built an export yet."
        initialSort={[{ id: 'id', desc: true }]}
        pageSize={10}
      />
    </section>
  );
}
