import type { ClassifierDetail, MyAgreement } from '../../../../shared/schemas/analytics';
import { FLAG_RULE_LABELS, FLAG_STATUS_LABELS } from '../../../../shared/schemas/analytics';
import { BoundaryBars, ConfusionChart, CusumChart, DistributionChart, TrendChart } from './charts';
import { formatCount, formatPoints, formatSigned, plural } from '../../../lib/format';
import { integer, num, pct, signed, withInterval } from './format';

function StatCard({ label, value, detail, testId }: { label: string; value: string; detail?: string; testId?: string }) {
  return (
    <div className="card py-4">
      <dt className="text-sm text-muted">{label}</dt>
      <dd className="stat-value" data-testid={testId}>
        {value}
      </dd>
      {detail ? <dd className="mt-1 text-sm text-muted">{detail}</dd> : null}
    </div>
  );
}

/**
 * One classifier's figures against the panel: the headline numbers, the confusion matrix with
 * the panel's final class, bias by quarter, the boundaries where they split from the panel,
 * the change detector and (for the lead or themselves) their flags. `who` is how the text
 * refers to the classifier ("C05" or "you").
 */
export function ClassifierFigures({ detail, who, fileStem }: { detail: ClassifierDetail | MyAgreement; who: string; fileStem: string }) {
  const { row } = detail;
  const splits = [...detail.boundaries].filter((b) => b.splitRate !== null && b.touching >= 5).sort((a, b) => (b.splitRate ?? 0) - (a.splitRate ?? 0));
  const top = splits.slice(0, 3);
  const biasWord = row.bias.value === null ? '' : row.bias.value > 0 ? 'higher than' : row.bias.value < 0 ? 'lower than' : 'level with';
  const lastQuarter = detail.biasByQuarter.at(-1);
  const whose = who === 'you' ? 'Your' : `${who}’s`;
  return (
    <div className="space-y-6">
      <section aria-labelledby="headline-title">
        <h2 id="headline-title" className="mb-3">
          Against the panel
        </h2>
        <dl className="grid grid-cols-2 gap-3 lg:grid-cols-4">
          <StatCard label="Ratings in panels of two or more" value={integer.format(row.n)} detail={`${integer.format(row.ratings)} ratings in all`} testId="classifier-n" />
          <StatCard label="Same class as the rest of the panel" value={pct(row.exactWithPanel.value)} detail={`within half a class: ${pct(row.withinHalfWithPanel.value)}`} />
          <StatCard label="Bias (points, + = higher)" value={signed(row.bias.value)} detail={row.bias.ci95 ? `95 % CI ${signed(row.bias.ci95[0])} to ${signed(row.bias.ci95[1])}` : undefined} />
          <StatCard label="Quadratic kappa with the panel" value={num(row.quadraticKappa.value)} detail={row.quadraticKappa.ci95 ? `95 % CI ${num(row.quadraticKappa.ci95[0])} to ${num(row.quadraticKappa.ci95[1])}` : row.quadraticKappa.reason} />
        </dl>
        <p className="mt-2 text-sm text-muted">
          Bias is the mean of (rating − median of the other panel members) in sport-class points; 0.5 is one class step. The kappa is Cohen’s quadratically weighted kappa
          against the panel’s final class where recorded (decision record 0003).
        </p>
      </section>

      {'distribution' in detail ? <Distribution detail={detail} /> : null}

      <div className="grid gap-6 xl:grid-cols-2">
        <ConfusionChart
          confusion={detail.confusion}
          title={`Classes given by ${who} against the panel’s final class`}
          xLabel="Panel’s final class (sport class)"
          yLabel={`Class given by ${who} (sport class)`}
          fileName={`${fileStem}-confusion`}
          summary={`${integer.format(detail.confusion.n)} ratings with a recorded final class; ${pct(
            detail.confusion.n ? detail.confusion.counts.reduce((s, r, i) => s + r[i]!, 0) / detail.confusion.n : null,
          )} on the diagonal (same class as the panel).`}
        />
        <TrendChart
          points={detail.biasByQuarter}
          title={`${whose} bias by quarter`}
          yLabel="Mean deviation from the panel (points)"
          fileName={`${fileStem}-bias-by-quarter`}
          reference={0}
          summary={
            lastQuarter
              ? `Over all quarters, ${who} rated ${biasWord} the rest of the panel by ${formatPoints(Math.abs(row.bias.value ?? 0))} on average; in ${lastQuarter.quarter} the mean deviation was ${formatSigned(lastQuarter.value)} ${plural(Math.abs(lastQuarter.value ?? 0), 'point')} (n = ${lastQuarter.n}). The band is the 95 % interval.`
              : 'No ratings in panels of two or more in these filters.'
          }
        />
      </div>

      <div className="grid gap-6 xl:grid-cols-2">
        <BoundaryBars
          bars={detail.boundaries.map((b) => ({ boundary: `${b.lower}/${b.upper}`, value: b.splitRate, lo: b.ci95?.[0] ?? null, hi: b.ci95?.[1] ?? null, n: b.touching }))}
          title={`Where ${who} and the panel fall on different sides of a boundary`}
          yLabel="Ratings split from the panel (%)"
          fileName={`${fileStem}-boundaries`}
          summary={
            top.length
              ? `Most often at ${top.map((b) => `${b.lower}/${b.upper} (${pct(b.splitRate)} of ${b.touching})`).join(', ')}.`
              : 'Too few ratings near any boundary in these filters.'
          }
        />
        <CusumChart
          points={detail.drift.points}
          h={detail.drift.h}
          title={`${whose} change detector (CUSUM)`}
          fileName={`${fileStem}-cusum`}
          summary={`Two one-sided cumulative sums of standardised deviations from the panel (k = ${num(detail.drift.k)}, h = ${num(detail.drift.h, 1)}, σ = ${num(
            detail.drift.sigma,
            3,
          )} point; decision record 0002). ${
            detail.drift.alarms.length
              ? `${formatCount(detail.drift.alarms.length, 'signal')}, the last in ${detail.drift.alarms.at(-1)!.quarter} towards rating ${detail.drift.alarms.at(-1)!.direction === 'up' ? 'higher' : 'lower'}.`
              : 'No signal.'
          }`}
        />
      </div>

      <section aria-labelledby="flags-title" className="card">
        <h2 id="flags-title">Calibration flags</h2>
        {detail.flags.length === 0 ? (
          <p className="mt-2 text-muted">No calibration flag.</p>
        ) : (
          <ul className="mt-3 space-y-3">
            {detail.flags.map((f) => (
              <li key={f.id} className="border-l-4 border-amber pl-3">
                <p className="font-semibold">
                  {FLAG_RULE_LABELS[f.rule]} · <span className="text-muted">{FLAG_STATUS_LABELS[f.status]}</span>
                </p>
                <p className="text-sm">{f.evidence.summary}</p>
                {f.note ? <p className="text-sm text-muted">Note: {f.note}</p> : null}
              </li>
            ))}
          </ul>
        )}
      </section>
      <p className="text-sm text-muted">Quadratic kappa with the panel: {withInterval(row.quadraticKappa)}.</p>
    </div>
  );
}

function Distribution({ detail }: { detail: MyAgreement }) {
  const { distribution, row } = detail;
  const rank = (values: number[], own: number | null) => (own === null ? null : values.filter((v) => v < own).length);
  const kRank = rank(distribution.quadraticKappa, row.quadraticKappa.value);
  return (
    <section aria-labelledby="spread-title" className="space-y-3">
      <h2 id="spread-title">You among the federation’s classifiers</h2>
      <p className="text-sm text-muted">Each grey dot is one classifier of the federation, without names. The orange line is you.</p>
      <div className="grid gap-6 xl:grid-cols-2">
        <DistributionChart
          values={distribution.quadraticKappa}
          own={row.quadraticKappa.value}
          title="Quadratic kappa with the panel, all classifiers"
          xLabel="Quadratic kappa (unitless, 1 = perfect agreement)"
          fileName="my-kappa-distribution"
          summary={
            kRank === null
              ? 'Your kappa is not defined in these filters.'
              : `Your kappa is ${num(row.quadraticKappa.value)}; ${kRank} of ${distribution.quadraticKappa.length} classifiers have a lower one.`
          }
        />
        <DistributionChart
          values={distribution.bias}
          own={row.bias.value}
          title="Bias against the panel, all classifiers"
          xLabel="Mean deviation from the panel (points, + = higher)"
          fileName="my-bias-distribution"
          summary={`Your bias is ${signed(row.bias.value)} ${plural(Math.abs(row.bias.value ?? 0), 'point')}; the federation’s classifiers range from ${signed(distribution.bias[0])} to ${signed(distribution.bias.at(-1))}.`}
        />
      </div>
    </section>
  );
}
