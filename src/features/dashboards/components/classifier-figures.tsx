import type { ClassifierDetail, MyAgreement } from '../../../../shared/schemas/analytics';
import { FLAG_RULE_LABELS, FLAG_STATUS_LABELS } from '../../../../shared/schemas/analytics';
import { BoundaryBars, ConfusionChart, DistributionChart, LevelChangeChart, TrendChart } from '../../../components/charts';
import { FlagLapse } from './flag-lapse';
import { formatPoints, formatSigned, plural } from '../../../lib/format';
import { integer, num, pct, signed, withInterval } from '../../../lib/stat-format';

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
  const splits = [...detail.boundaries]
    .filter((b) => b.splitRate !== null && b.touching >= 5)
    .sort((a, b) => (b.splitRate ?? 0) - (a.splitRate ?? 0));
  const top = splits.slice(0, 3);
  const biasWord = row.bias.value === null ? '' : row.bias.value > 0 ? 'higher than' : row.bias.value < 0 ? 'lower than' : 'level with';
  const lastQuarter = detail.biasByQuarter.at(-1);
  const whose = who === 'you' ? 'Your' : `${who}’s`;
  const h = detail.headline;
  const own = who === 'you';
  const stake = h.pointsAtStake;
  return (
    <div className="space-y-6">
      <section aria-labelledby="headline-title">
        <h2 id="headline-title" className="mb-3">
          Same class as the panel
        </h2>
        {own ? (
          <p className="mb-3 max-w-3xl" data-testid="plain-words">
            In plain words: in {integer.format(h.sameAsFinal.n)} of your ratings with a recorded final class, you gave the panel’s final
            class {pct(h.sameAsFinal.value)} of the time. On average your class was {num(stake.meanAbs.value)} point from the final class —
            about {num(stake.per100, 0)} points per 100 ratings — and {pct(stake.offByHalf.value)} of your ratings were half a class or more
            away.{' '}
            {row.bias.value !== null && Math.abs(row.bias.value) >= 0.05
              ? `You tend to rate ${row.bias.value > 0 ? 'higher' : 'lower'} than the other members of your panels, by ${num(Math.abs(row.bias.value))} point on average.`
              : 'You rate neither higher nor lower than the other members of your panels on average.'}{' '}
            These figures describe how consistent ratings are, not whether any class is right.
          </p>
        ) : null}
        <dl className="grid grid-cols-2 gap-3 lg:grid-cols-5">
          <StatCard
            label="Same class as the panel’s final class"
            value={pct(h.sameAsFinal.value)}
            detail={`${integer.format(h.sameAsFinal.n)} ratings with a final class`}
            testId="classifier-same-final"
          />
          <StatCard
            label="Same class as the other members"
            value={pct(row.exactWithPanel.value)}
            detail={`${integer.format(row.n)} ratings in panels of two or more`}
            testId="classifier-n"
          />
          <StatCard
            label="Points at stake (per 100 ratings)"
            value={num(stake.per100, 0)}
            detail={`mean ${num(stake.meanAbs.value)} point from the final class; ${pct(stake.offByHalf.value)} off by half a class or more`}
            testId="classifier-points-at-stake"
          />
          <StatCard
            label="Lean (points, + = higher)"
            value={signed(row.bias.value)}
            detail={row.bias.ci95 ? `95 % CI ${signed(row.bias.ci95[0])} to ${signed(row.bias.ci95[1])}` : undefined}
          />
          <StatCard
            label="Severity (points, + = higher)"
            value={signed(row.severity.value)}
            detail={
              row.severity.ci95
                ? `95 % CI ${signed(row.severity.ci95[0])} to ${signed(row.severity.ci95[1])}; ${row.severity.links} linked classifiers`
                : row.severity.reason
            }
            testId="classifier-severity"
          />
        </dl>
        <p className="mt-2 text-sm text-muted">
          Half-point splits from the panel:{' '}
          {top.length
            ? top.map((b) => `${b.lower}/${b.upper} ${pct(b.splitRate)} of ${b.touching}`).join(' · ')
            : 'too few ratings near any boundary'}
          . Points at stake is our own figure: the mean distance from the panel’s final class in sport-class points, ×100. Severity is how
          much higher or lower {who === 'you' ? 'you rate' : `${who} rates`} than the federation’s average classifier would for the same
          athlete, with whom one sat with taken out (decision record 0009).
        </p>
        <h3 className="mt-4 mb-2 text-base">Beyond chance, then with partial credit</h3>
        <dl className="grid grid-cols-1 gap-3 sm:grid-cols-3">
          <StatCard
            label="Cohen’s kappa, unweighted (vs final class)"
            value={num(h.kappa.value)}
            detail={`${h.kappa.label ?? ''}${h.kappa.ci95 ? ` · 95 % CI ${num(h.kappa.ci95[0])} to ${num(h.kappa.ci95[1])}` : ''}`}
          />
          <StatCard
            label="Gwet’s AC1 (vs final class)"
            value={num(h.ac1.value)}
            detail={`${h.ac1.label ?? ''}${h.ac1.ci95 ? ` · 95 % CI ${num(h.ac1.ci95[0])} to ${num(h.ac1.ci95[1])}` : ''}`}
          />
          <StatCard
            label="Quadratically weighted kappa — counts a half-class miss as near agreement"
            value={num(h.quadraticKappa.value)}
            detail={
              h.quadraticKappa.ci95
                ? `95 % CI ${num(h.quadraticKappa.ci95[0])} to ${num(h.quadraticKappa.ci95[1])}`
                : h.quadraticKappa.reason
            }
          />
        </dl>
        <details className="mt-2 text-sm text-muted">
          <summary className="cursor-pointer font-semibold">How this is computed</summary>
          <p className="mt-1">
            The lean is the mean of (rating − median of the other panel members) in sport-class points; 0.5 is one class step. Kappa and AC1
            compare the classifier’s class with the panel’s final class (Cohen 1960; Gwet 2008), with Landis & Koch’s (1977) words beside
            them; the weighted kappa is Cohen’s quadratically weighted kappa against the panel’s final class where recorded (decision record
            0003). The change of level is tested on the deviations in chronological order: {detail.drift.method}.
          </p>
        </details>
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
            detail.confusion.n ? detail.confusion.counts.reduce((s, r, i) => s + r[i], 0) / detail.confusion.n : null,
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
          bars={detail.boundaries.map((b) => ({
            boundary: `${b.lower}/${b.upper}`,
            value: b.splitRate,
            lo: b.ci95?.[0] ?? null,
            hi: b.ci95?.[1] ?? null,
            n: b.touching,
          }))}
          title={`Where ${who} and the panel fall on different sides of a boundary`}
          yLabel="Ratings split from the panel (%)"
          fileName={`${fileStem}-boundaries`}
          summary={
            top.length
              ? `Most often at ${top.map((b) => `${b.lower}/${b.upper} (${pct(b.splitRate)} of ${b.touching})`).join(', ')}.`
              : 'Too few ratings near any boundary in these filters.'
          }
        />
        <LevelChangeChart
          points={detail.drift.points}
          change={detail.drift.change}
          title={`${whose} level over time`}
          fileName={`${fileStem}-level-change`}
          summary={
            detail.drift.change
              ? `${own ? 'Your' : `${who}’s`} strongest change of level in these filters is around ${detail.drift.change.changeDate} (between ${detail.drift.change.between[0]} and ${
                  detail.drift.change.between[1]
                }): ${signed(detail.drift.change.sizeBefore)} point from the panel on average over ${detail.drift.change.nBefore} ratings before, ${signed(
                  detail.drift.change.sizeAfter,
                )} over ${detail.drift.change.nAfter} after (permutation p = ${num(detail.drift.change.p, 3)} for this classifier alone; flags adjust for the whole roster).`
              : 'Too few ratings in panels of two or more to look for a change.'
          }
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
                <FlagLapse flag={f} />
                <p className="text-sm">{own && f.evidence.plain ? f.evidence.plain : f.evidence.summary}</p>
                {own && f.evidence.plain ? (
                  <details className="text-sm text-muted">
                    <summary className="cursor-pointer">How this is computed</summary>
                    <p className="mt-1">{f.evidence.summary}</p>
                  </details>
                ) : null}
                {f.note ? <p className="text-sm text-muted">Note: {f.note}</p> : null}
              </li>
            ))}
          </ul>
        )}
      </section>
      <p className="text-sm text-muted">
        Quadratic kappa with the panel: {withInterval(row.quadraticKappa)}. A flag is a prompt to look at the ratings, not a finding;
        decisions belong to the federation’s rules and licensed classifiers.
      </p>
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
