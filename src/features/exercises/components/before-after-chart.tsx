import * as Plot from '@observablehq/plot';
import type { BeforeAfter } from '../../../../shared/schemas/exercises';
import { CHART_COLORS, MUTED, PlotFigure } from '../../../components/plot-figure';
import { Legend } from '../../../components/charts';
import { pct } from '../../../lib/stat-format';

const PHASES = ['before', 'during', 'after'] as const;
const PHASE_LABELS = { before: 'Before the exercise', during: 'Quarter of the exercise', after: 'After the exercise' } as const;
const PHASE_COLORS = [CHART_COLORS[0], CHART_COLORS[4], CHART_COLORS[1]];

/** A flagged classifier's exact agreement with the panel by quarter, marked before, during and after the exercise. */
export function BeforeAfterChart({ item }: { item: BeforeAfter }) {
  const data = item.quarters.filter((q) => q.exact !== null).map((q) => ({ ...q, label: PHASE_LABELS[q.phase], value: q.exact! * 100 }));
  const before = item.before.exactWithPanel.value;
  const after = item.after.exactWithPanel.value;
  const summary =
    `Exact agreement of ${item.classifierCode} with the rest of the panel by quarter, ${data.length} quarters. ` +
    `Before the exercise: ${pct(before)} over ${item.before.n} ratings; after: ${after === null ? 'no ratings yet' : `${pct(after)} over ${item.after.n} ratings`}.`;
  return (
    <PlotFigure
      title={`${item.classifierCode}: exact agreement with the panel, before and after`}
      summary={summary}
      fileName={`exercise-before-after-${item.classifierCode}`}
      deps={[item]}
      height={260}
      build={(width) => ({
        marginBottom: width < 640 ? 78 : 40,
        marginLeft: 56,
        x: {
          label: 'Quarter (calendar)',
          type: 'point',
          tickRotate: width < 640 ? -45 : 0,
          padding: 0.3,
          domain: data.map((d) => d.quarter),
        },
        y: { label: 'Exact agreement with the panel (%)', domain: [0, 100], grid: true },
        color: { domain: PHASES.map((p) => PHASE_LABELS[p]), range: PHASE_COLORS },
        marks: [
          Plot.ruleY([0], { stroke: MUTED }),
          Plot.lineY(data, { x: 'quarter', y: 'value', stroke: MUTED, strokeOpacity: 0.5 }),
          Plot.dot(data, {
            x: 'quarter',
            y: 'value',
            fill: 'label',
            r: 4,
            tip: true,
            title: (d: (typeof data)[number]) => `${d.quarter} (${d.label.toLowerCase()}): ${d.value.toFixed(0)} % of ${d.n} ratings`,
          }),
        ],
      })}
    >
      <Legend items={PHASES.map((p, i) => ({ label: PHASE_LABELS[p], color: PHASE_COLORS[i] }))} />
      {after === null ? (
        <p className="text-sm text-muted">
          No live-panel rating since the exercise closed yet: the after window fills as new assessments are imported.
        </p>
      ) : null}
    </PlotFigure>
  );
}
