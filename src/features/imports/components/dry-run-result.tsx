import type { DryRun, ImportIssue } from '../../../../shared/schemas/imports';
import { DataTable, type DataTableColumn } from '../../../components/data-table';

const number = new Intl.NumberFormat('en');

const ISSUE_COLUMNS: DataTableColumn<ImportIssue & { key: string }>[] = [
  { key: 'row', header: 'Row', align: 'right', cell: (i) => (i.row === null ? 'file' : number.format(i.row)) },
  { key: 'line', header: 'Line', align: 'right', cell: (i) => (i.line === null ? '—' : number.format(i.line)) },
  { key: 'column', header: 'Column', cell: (i) => i.column ?? '—' },
  { key: 'value', header: 'Value', cell: (i) => (i.value === null ? '—' : <code className="break-all">{i.value === '' ? '(blank)' : i.value}</code>) },
  { key: 'message', header: 'Problem', sortable: false },
];

function keyed(issues: ImportIssue[]) {
  return issues.map((issue, i) => ({ ...issue, key: String(i) }));
}

/** What the dry run found: counts of new, changed and unchanged records, and the problems. */
export function DryRunResult({ result }: { result: DryRun }) {
  const { counts } = result;
  const entities = counts
    ? ([
        ['Assessments', counts.assessments],
        ['Ratings', counts.ratings],
        ['Classifiers', counts.classifiers],
        ['Athletes', counts.athletes],
        ['Events', counts.events],
      ] as const)
    : [];
  return (
    <div className="space-y-5">
      {result.outcome === 'refused' ? (
        <p role="alert" className="rounded-lg bg-alert-soft px-4 py-3 text-alert">
          The file was refused and nothing was imported: {number.format(result.errorCount)} {result.errorCount === 1 ? 'problem' : 'problems'}
          {result.errorCount > result.errors.length ? ` (the first ${result.errors.length} are listed)` : ''}. Correct the file or the mapping and check it again.
        </p>
      ) : result.outcome === 'nothing-to-do' ? (
        <p role="status" className="rounded-lg bg-harbour-soft px-4 py-3">
          Nothing to import: every row is already in the federation’s data
          {result.sameFileAs ? ` (this file was imported as import #${result.sameFileAs.importId})` : ''}.
        </p>
      ) : (
        <p role="status" className="rounded-lg bg-ok-soft px-4 py-3 text-ok">
          The file passed every check. Nothing is written until you commit the import.
        </p>
      )}

      {counts ? (
        <div className="overflow-x-auto rounded-lg border border-line bg-card">
          <table className="w-full border-collapse text-sm">
            <caption className="px-3 py-2 text-left font-semibold">What the import would do ({number.format(counts.rows)} rows read)</caption>
            <thead className="bg-paper">
              <tr>
                <th scope="col" className="px-3 py-2 text-left">
                  Records
                </th>
                <th scope="col" className="px-3 py-2 text-right">
                  New
                </th>
                <th scope="col" className="px-3 py-2 text-right">
                  Changed
                </th>
                <th scope="col" className="px-3 py-2 text-right">
                  Unchanged
                </th>
              </tr>
            </thead>
            <tbody>
              {entities.map(([label, c]) => (
                <tr key={label} className="border-t border-line">
                  <th scope="row" className="px-3 py-1.5 text-left font-normal">
                    {label}
                  </th>
                  <td className="px-3 py-1.5 text-right tabular-nums" data-testid={`dry-${label.toLowerCase()}-new`}>
                    {number.format(c.new)}
                  </td>
                  <td className="px-3 py-1.5 text-right tabular-nums">{number.format(c.changed)}</td>
                  <td className="px-3 py-1.5 text-right tabular-nums">{number.format(c.unchanged)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          {counts.notAnalysable > 0 ? (
            <p className="border-t border-line px-3 py-2 text-sm text-muted">
              {number.format(counts.notAnalysable)} {counts.notAnalysable === 1 ? 'assessment has' : 'assessments have'} ratings from a single classifier: kept, but not
              analysable for agreement.
            </p>
          ) : null}
        </div>
      ) : null}

      {result.errors.length > 0 ? (
        <section aria-labelledby="dry-run-errors" className="space-y-2">
          <h3 id="dry-run-errors">Problems</h3>
          <DataTable caption="Problems found in the file" rows={keyed(result.errors)} columns={ISSUE_COLUMNS} rowKey={(r) => r.key} pageSize={25} filterable csvFileName="import-problems.csv" />
        </section>
      ) : null}
      {result.warnings.length > 0 && result.outcome !== 'refused' ? (
        <details className="card">
          <summary className="cursor-pointer font-semibold">
            {number.format(result.warningCount)} {result.warningCount === 1 ? 'note' : 'notes'} (kept, no action needed)
          </summary>
          <div className="mt-3">
            <DataTable caption="Notes on the file" rows={keyed(result.warnings)} columns={ISSUE_COLUMNS} rowKey={(r) => r.key} pageSize={10} />
          </div>
        </details>
      ) : null}
    </div>
  );
}
