import { useId, useState } from 'react';
import { Link } from 'react-router';
import { FLAG_RULE_LABELS, FLAG_STATUS_LABELS, type CalibrationFlag } from '../../../../shared/schemas/analytics';
import { useCurrentFederation } from '../../../lib/use-federation';
import { DataTable } from '../../../components/data-table';
import { ErrorNotice } from '../../../components/status';
import { formatCount, formatDate, formatDateTime, formatInteger, formatNumber } from '../../../lib/format';
import { useEvaluateFlags } from '../api/evaluate-flags';
import { useFlagSettings } from '../api/get-flag-settings';
import { useFlags } from '../api/get-flags';
import { useUpdateFlag } from '../api/update-flag';
import { FlagLapse } from './flag-lapse';
import { FlagSettingsForm } from './flag-settings-form';
import { PageFrame, QueryState } from './page-frame';

export function FlagsPage() {
  const { federation } = useCurrentFederation();
  const flags = useFlags(federation.slug);
  const settings = useFlagSettings(federation.slug);
  const evaluate = useEvaluateFlags(federation.slug);
  const [show, setShow] = useState<'active' | 'all'>('active');

  return (
    <PageFrame
      title="Calibration flags"
      intro="Classifiers whose ratings meet one of three tested rules — a persistent lean, a change in their own level (drift), same-class agreement below the federation’s — with the evidence behind each flag. Each rule controls chance flags across the roster (decision record 0008). A flag stays until you close it with a note; when its condition stops holding it says so, with today’s figures. It is a prompt to look and talk, not a finding."
      federation={federation.slug}
      filters={null}
    >
      <section aria-labelledby="flag-list-title" className="space-y-3">
        <div className="flex flex-wrap items-center gap-3">
          <h2 id="flag-list-title" className="mr-auto">
            Flags
          </h2>
          <label className="flex items-center gap-2 text-sm font-semibold">
            Show
            <select className="input min-h-10 py-1.5" value={show} onChange={(e) => setShow(e.target.value as 'active' | 'all')}>
              <option value="active">Open and acknowledged</option>
              <option value="all">All, closed included</option>
            </select>
          </label>
          <button type="button" className="btn btn-quiet" onClick={() => evaluate.mutate()} disabled={evaluate.isPending}>
            {evaluate.isPending ? 'Evaluating…' : 'Evaluate now'}
          </button>
        </div>
        {evaluate.data ? (
          <p role="status" className="text-sm text-muted">
            Evaluated: {evaluate.data.opened} new, {evaluate.data.updated} updated.
          </p>
        ) : null}
        {evaluate.isError ? <ErrorNotice error={evaluate.error} /> : null}
        <QueryState query={flags}>
          {(data) => {
            const rows = data.flags.filter((f) => show === 'all' || f.status !== 'closed');
            return (
              <>
                <p className="text-sm text-muted">
                  {data.evaluatedAt ? `Last evaluated ${formatDateTime(data.evaluatedAt)}.` : 'Not evaluated yet.'}
                </p>
                <DataTable
                  caption="Calibration flags"
                  filterable
                  pageSize={15}
                  csvFileName={`${federation.slug}-calibration-flags.csv`}
                  rowKey={(r) => String(r.id)}
                  emptyText="No flag."
                  columns={[
                    {
                      key: 'classifier',
                      header: 'Classifier',
                      cell: (r) => (
                        <Link
                          to={`../classifiers/${encodeURIComponent(r.flag.classifierCode)}`}
                          relative="path"
                          className="font-semibold text-harbour underline"
                        >
                          {r.classifier}
                        </Link>
                      ),
                    },
                    { key: 'rule', header: 'Rule' },
                    { key: 'evidence', header: 'Evidence', cell: (r) => <EvidenceCell flag={r.flag} /> },
                    { key: 'status', header: 'Status', cell: (r) => <StatusBadge flag={r.flag} /> },
                    { key: 'opened', header: 'Opened' },
                    {
                      key: 'actions',
                      header: 'Actions',
                      sortable: false,
                      cell: (r) => <FlagActions federation={federation.slug} flag={r.flag} />,
                      csv: (r) => r.flag.note ?? '',
                    },
                  ]}
                  rows={rows.map((f) => ({
                    id: f.id,
                    classifier: `${f.classifierCode} ${f.classifierName ?? ''}`.trim(),
                    rule: FLAG_RULE_LABELS[f.rule],
                    evidence: f.evidence.summary,
                    status: FLAG_STATUS_LABELS[f.status],
                    opened: formatDate(f.openedAt),
                    actions: '',
                    flag: f,
                  }))}
                />
              </>
            );
          }}
        </QueryState>
      </section>
      <QueryState query={settings}>{(th) => <FlagSettingsForm federation={federation.slug} initial={th} />}</QueryState>
      <p className="text-sm text-muted">
        How each rule works, its default and what the statuses mean:{' '}
        <Link to="../help#flags" relative="path" className="font-semibold text-harbour underline">
          Help: calibration flags
        </Link>
        . The tests behind the rules and their simulated false-flag rates and power are in the project’s decision record 0008.
      </p>
    </PageFrame>
  );
}

function EvidenceCell({ flag }: { flag: CalibrationFlag }) {
  const e = flag.evidence;
  return (
    <div className="max-w-md space-y-0.5">
      <p>{e.summary}</p>
      <p className="text-xs text-muted">
        {e.ci95 ? `95 % CI ${formatNumber(e.ci95[0])} to ${formatNumber(e.ci95[1])} · ` : ''}
        {formatCount(e.n, 'rating')}
        {e.total !== undefined && e.total !== e.n ? ` of ${formatInteger(e.total)}` : ''}
        {e.from ? `, ${formatDate(e.from)} to ${formatDate(e.to)}` : ''}
        {e.changeDate ? ` · change around ${formatDate(e.changeDate)}, ${e.direction === 'up' ? 'up' : 'down'}` : ''}
      </p>
    </div>
  );
}

function StatusBadge({ flag }: { flag: CalibrationFlag }) {
  const tone = flag.status === 'open' ? 'bg-amber-soft' : flag.status === 'acknowledged' ? 'bg-harbour-soft' : 'bg-ok-soft';
  return (
    <div className="space-y-1">
      <span className={`inline-block rounded-full px-2 py-0.5 text-xs font-semibold text-ink ${tone}`}>
        {FLAG_STATUS_LABELS[flag.status]}
      </span>
      <FlagLapse flag={flag} />
      {flag.note ? <p className="text-xs text-muted">Note: {flag.note}</p> : null}
    </div>
  );
}

function FlagActions({ federation, flag }: { federation: string; flag: CalibrationFlag }) {
  const update = useUpdateFlag(federation);
  const [closing, setClosing] = useState(false);
  const [note, setNote] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const id = useId();
  if (flag.status === 'closed') return <span className="text-xs text-muted">Closed</span>;
  return (
    <div className="space-y-2">
      <div className="flex flex-wrap gap-2">
        {flag.status === 'open' ? (
          <button
            type="button"
            className="btn btn-quiet min-h-9 px-3 py-1 text-sm"
            disabled={update.isPending}
            onClick={() => update.mutate({ id: flag.id, update: { status: 'acknowledged' } })}
          >
            Acknowledge
          </button>
        ) : null}
        <button
          type="button"
          className="btn btn-quiet min-h-9 px-3 py-1 text-sm"
          aria-expanded={closing}
          onClick={() => setClosing((v) => !v)}
        >
          Close…
        </button>
      </div>
      {closing ? (
        <form
          className="space-y-2"
          onSubmit={(e) => {
            e.preventDefault();
            if (note.trim() === '') {
              setProblem('Write what was done before closing the flag.');
              return;
            }
            setProblem(null);
            update.mutate({ id: flag.id, update: { status: 'closed', note: note.trim() } });
          }}
        >
          <label htmlFor={`${id}-note`} className="block text-sm font-semibold">
            Note (what was done)
          </label>
          <textarea
            id={`${id}-note`}
            className="input w-full"
            rows={2}
            value={note}
            onChange={(e) => setNote(e.target.value)}
            aria-invalid={problem ? 'true' : undefined}
          />
          {problem ? (
            <p role="alert" className="field-error">
              {problem}
            </p>
          ) : null}
          <button type="submit" className="btn btn-primary min-h-9 px-3 py-1 text-sm" disabled={update.isPending}>
            Close flag
          </button>
        </form>
      ) : null}
      {update.isError ? <ErrorNotice error={update.error} /> : null}
    </div>
  );
}
