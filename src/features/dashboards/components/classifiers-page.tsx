import { Link, useLocation } from 'react-router';
import { FLAG_RULE_LABELS, FLAG_STATUS_LABELS, type ClassifierRow } from '../../../../shared/schemas/analytics';
import { useCurrentFederation } from '../../../lib/use-federation';
import { DataTable, type DataTableColumn } from '../../../components/data-table';
import { useClassifiers } from '../api/get-classifiers';
import { formatNumber } from '../../../lib/format';
import { num, pct, signed } from '../../../lib/stat-format';
import { PageFrame, QueryState } from './page-frame';
import { PanelNetworkChart } from './panel-network-chart';
import { Sparkline } from './sparkline';
import { useAnalyticsFilters } from './use-analytics-filters';

interface TableRow {
  code: string;
  name: string;
  n: number;
  exact: number | null;
  within: number | null;
  stake: number | null;
  bias: number | null;
  biasCi: string;
  severity: number | null;
  severityCi: string;
  kappa: number | null;
  kappaCi: string;
  trend: string;
  flags: string;
  source: ClassifierRow;
}

const ci = (c: [number, number] | null) => (c ? `${num(c[0])} to ${num(c[1])}` : '');

export function ClassifiersPage() {
  const { federation } = useCurrentFederation();
  const filters = useAnalyticsFilters();
  const query = useClassifiers(federation.slug, filters.filters);
  const { search } = useLocation();

  const columns: DataTableColumn<TableRow>[] = [
    {
      key: 'code',
      header: 'Classifier',
      cell: (r) => (
        <Link to={`${encodeURIComponent(r.code)}${search}`} className="font-semibold text-harbour underline">
          {r.code}
        </Link>
      ),
    },
    { key: 'name', header: 'Name' },
    { key: 'n', header: 'Ratings (n)', align: 'right' },
    { key: 'exact', header: 'Same class as panel', align: 'right', cell: (r) => pct(r.exact) },
    { key: 'stake', header: 'Points at stake per 100 ratings', align: 'right', cell: (r) => num(r.stake, 0) },
    { key: 'within', header: 'Within half a class', align: 'right', cell: (r) => pct(r.within) },
    {
      key: 'bias',
      header: 'Bias (points)',
      align: 'right',
      cell: (r) => (
        <span title={r.biasCi ? `95 % CI ${r.biasCi}` : undefined}>
          {signed(r.bias)}
          <span className="block text-xs text-muted">{r.biasCi}</span>
        </span>
      ),
    },
    {
      key: 'severity',
      header: 'Severity (points)',
      align: 'right',
      cell: (r) => (
        <span title={r.source.severity.reason ?? (r.severityCi ? `95 % CI ${r.severityCi}` : undefined)}>
          {signed(r.severity)}
          <span className="block text-xs text-muted">{r.severity === null ? 'not linked' : r.severityCi}</span>
        </span>
      ),
    },
    {
      key: 'kappa',
      header: 'Quadratic kappa',
      align: 'right',
      cell: (r) => (
        <span>
          {num(r.kappa)}
          <span className="block text-xs text-muted">{r.kappaCi}</span>
        </span>
      ),
    },
    {
      key: 'trend',
      header: 'Bias by quarter',
      sortable: false,
      cell: (r) => <Sparkline points={r.source.trend} label={`Bias of ${r.code} by quarter`} />,
      csv: (r) => r.trend,
    },
    {
      key: 'flags',
      header: 'Flags',
      cell: (r) =>
        r.source.flags.length ? (
          <ul className="space-y-1">
            {r.source.flags.map((f) => (
              <li key={f.id} className="inline-block rounded-full bg-amber-soft px-2 py-0.5 text-xs font-semibold text-ink">
                {FLAG_RULE_LABELS[f.rule]} · {FLAG_STATUS_LABELS[f.status]}
              </li>
            ))}
          </ul>
        ) : (
          <span className="text-muted">—</span>
        ),
    },
  ];

  return (
    <PageFrame
      title="Classifiers"
      intro="Each classifier against the rest of their panels: how often they give the same class, their bias (positive: they rate higher), Cohen’s quadratically weighted kappa with the panel, and their bias by quarter."
      federation={federation.slug}
      filters={filters}
    >
      <QueryState query={query}>
        {(data) => (
          <div className="space-y-6">
            <DataTable
              caption="Classifiers against the panel"
              filterable
              csvFileName={`${federation.slug}-classifiers.csv`}
              rowKey={(r) => r.code}
              initialSort={[{ id: 'kappa', desc: false }]}
              columns={columns}
              rows={data.classifiers.map((c) => ({
                code: c.code,
                name: c.name ?? '',
                n: c.n,
                exact: c.exactWithPanel.value,
                within: c.withinHalfWithPanel.value,
                stake: c.pointsAtStake.per100,
                bias: c.bias.value,
                biasCi: ci(c.bias.ci95),
                severity: c.severity.value,
                severityCi: ci(c.severity.ci95),
                kappa: c.quadraticKappa.value,
                kappaCi: ci(c.quadraticKappa.ci95),
                trend: c.trend.map((p) => `${p.quarter}: ${p.value === null ? '' : formatNumber(p.value, 3)}`).join('; '),
                flags: c.flags.map((f) => `${FLAG_RULE_LABELS[f.rule]} (${FLAG_STATUS_LABELS[f.status]})`).join('; '),
                source: c,
              }))}
            />
            <SeverityNote />
            <section aria-labelledby="network-title" className="space-y-2">
              <h2 id="network-title">Who can be compared with whom</h2>
              <p className="text-sm text-muted">
                Severities rest on classifiers who sat on the same panels. A classifier with few links is compared through few colleagues;
                one outside the main network cannot be put on the common scale at all.
              </p>
              <PanelNetworkChart network={data.network} rows={data.classifiers} fileName={`${federation.slug}-panel-network`} />
            </section>
          </div>
        )}
      </QueryState>
    </PageFrame>
  );
}

/** The one-sentence reading of the severity column (decision record 0009). */
function SeverityNote() {
  return (
    <p className="text-sm text-muted" data-testid="severity-explanation">
      Severity is how much higher (+) or lower (−) a classifier rates than the federation’s average classifier would for the same athlete,
      fitted over all panels at once so that whom they sat with is taken out (bias compares them with their own panels only; decision record
      0009); like every figure here it describes consistency between classifiers, not whether any class is correct.
    </p>
  );
}
