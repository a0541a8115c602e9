import type { DryRun, ImportIssue } from '../../../../shared/schemas/imports';
import { DataTable, type DataTableColumn } from '../../../components/data-table';

const number = new Intl.NumberFormat('en');

const ISSUE_COLUMNS: DataTableColumn<ImportIssue & { key: string }>[] = [
  { key: 'row', header: 'Row', align: 'right', cell: (i) => (i.row === null ? 'file' : number.format(i.row)) },
  { key: 'line', header: 'Line', align: 'right', cell: (i) => (i.line === null ? '—' : number.format(i.line)) },
  { key: 'column', header: 'Column', cell: (i) => i.column ?? '—' },
  {
    key: 'value',
    header: 'Value',
    cell: (i) => (i.value === null ? '—' : <code className="break-all">{i.value === '' ? '(blank)' : i.value}</code>),
  },
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
        <div role="alert" className="space-y-2 rounded-lg bg-alert-soft px-4 py-3 text-alert">
          <p>
            The file was refused and nothing was imported: {number.format(result.errorCount)}{' '}
            {result.errorCount === 1 ? 'problem' : 'problems'}
            {result.errorCount > result.errors.length
              ? ` (the first ${number.format(result.errors.length)} of ${number.format(result.errorCount)} are listed)`
              : ''}
            . Correct the file or the mapping and check it again.
          </p>
          {(result.errorKinds?.length ?? 0) > 1 || (result.errorKinds ?? []).some((k) => k.shown < k.count) ? (
            <ul className="list-disc pl-5 text-sm" aria-label="Problems by kind">
              {(result.errorKinds ?? []).map((k, i) => (
                <li key={i}>
                  {k.column ? `${k.column}: ` : ''}
                  {number.format(k.count)} {k.count === 1 ? 'row' : 'rows'}, for example “{k.problem}”
                  {k.shown < k.count ? ` (first ${number.format(k.shown)} of ${number.format(k.count)} listed)` : ''}
                </li>
              ))}
            </ul>
          ) : null}
        </div>
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
            <caption className="px-3 py-2 text-left font-semibold">
              What the import would do ({number.format(counts.rows)} rows read)
            </caption>
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
              {number.format(counts.notAnalysable)} {counts.notAnalysable === 1 ? 'assessment has' : 'assessments have'} ratings from a
              single classifier: kept, but not analysable for agreement.
            </p>
          ) : null}
        </div>
      ) : null}

      {result.errors.length > 0 ? (
        <section aria-labelledby="dry-run-errors" className="space-y-2">
          <h3 id="dry-run-errors">Problems</h3>
          <DataTable
            caption="Problems found in the file"
            rows={keyed(result.errors)}
            columns={ISSUE_COLUMNS}
            rowKey={(r) => r.key}
            pageSize={25}
            filterable
            csvFileName="import-problems.csv"
          />
        </section>
      ) : null}
      {result.warnings.length > 0 && result.outcome !== 'refused' ? (
        <details className="card">
          <summary className="cursor-pointer font-semibold">
            {number.format(result.warningCount)} {result.warningCount === 1 ? 'note' : 'notes'} (kept, no action needed)
          </summary>
          <div className="mt-3">
            <DataTable
              caption="Notes on the file"
              rows={keyed(result.warnings)}
              columns={ISSUE_COLUMNS}
              rowKey={(r) => r.key}
              pageSize={10}
            />
          </div>
        </details>
      ) : null}
    </div>
  );
}

/**
 * Stored assessments the file gives to another athlete: listed, and the commit waits until the
 * lead confirms them (a checkbox with the consequence in words).
 */
export function AthleteChangesConfirmation({
  result,
  confirmed,
  onConfirm,
  disabled,
}: {
  result: DryRun;
  confirmed: boolean;
  onConfirm: (value: boolean) => void;
  disabled?: boolean;
}) {
  const n = result.athleteChangeCount ?? 0;
  const changes = result.athleteChanges ?? [];
  return (
    <section aria-labelledby="athlete-changes" className="card space-y-3 border-amber bg-amber-soft">
      <h3 id="athlete-changes">
        {number.format(n)} {n === 1 ? 'assessment already stored is' : 'assessments already stored are'} given to another athlete
      </h3>
      <p className="text-sm">
        Committing moves {n === 1 ? 'this assessment and its ratings' : 'these assessments and their ratings'} from the stored athlete to
        the one in the file. Check that the file is right; a revert of the import moves them back.
      </p>
      <ul className="list-disc pl-5 text-sm">
        {changes.map((c) => (
          <li key={c.assessmentId}>
            Assessment {c.assessmentId} (row {number.format(c.row)}): stored athlete {c.storedAthlete}, file says {c.fileAthlete}
          </li>
        ))}
        {n > changes.length ? <li>… and {number.format(n - changes.length)} more</li> : null}
      </ul>
      <label className="flex items-start gap-2 text-sm">
        <input type="checkbox" checked={confirmed} onChange={(e) => onConfirm(e.target.checked)} disabled={disabled} />
        <span>I confirm that {n === 1 ? 'this assessment belongs' : 'these assessments belong'} to the athlete in the file.</span>
      </label>
    </section>
  );
}
