import * as Plot from '@observablehq/plot';
import type { Confusion, QuarterStat } from '../../shared/schemas/analytics';
import { CHART_COLORS, INK, MUTED, PlotFigure } from './plot-figure';
import { categoryAxis, quarterRange, withQuarterGaps, yearTickFormat, yearTicks, type CategoryAxis } from '../lib/charts/axes';
import { formatPoints } from '../lib/format';
import { num } from '../lib/stat-format';

/**
 * The dashboards' charts, each a PlotFigure with a title, labelled axes (with units) and a text
 * summary. Colours come from the palette in src/index.css; ordered classes use cividis, which
 * stays readable with the common colour-vision deficiencies.
 */

const quarterAxis = (width: number) => ({
  label: 'Quarter (calendar)',
  type: 'point' as const,
  tickRotate: width < 640 ? -45 : 0,
  padding: 0.3,
  labelAnchor: 'center' as const,
  labelOffset: width < 640 ? 66 : 32,
});

/** On a long span, every quarter's label would run together: label each year's first quarter only. */
function quarterTicks(range: string[], width: number): { ticks?: string[] } {
  const perQuarter = (width - 80) / Math.max(1, range.length);
  return perQuarter >= 56 ? {} : { ticks: perQuarter * 4 >= 56 ? yearTicks(range) : yearTicks(range).filter((_, i) => i % 2 === 0) };
}

const pick = (axis: CategoryAxis, key: 'marginBottom') => ({ [key]: axis[key] });
const omit = (axis: CategoryAxis, key: 'marginBottom') => {
  const { [key]: _dropped, ...rest } = axis;
  return rest;
};

/** A quarterly series with its 95 % interval as a band. */
export function TrendChart({
  points,
  title,
  yLabel,
  fileName,
  summary,
  domain,
  reference,
}: {
  points: QuarterStat[];
  title: string;
  yLabel: string;
  fileName: string;
  summary: string;
  domain?: [number, number];
  /** A horizontal reference line (e.g. 0 for bias). */
  reference?: number;
}) {
  const data = points.filter((p) => p.value !== null);
  // Every quarter of the span is on the axis; a quarter without data breaks the line and band.
  const range = quarterRange(points.map((p) => p.quarter));
  const line = withQuarterGaps(data, range);
  const band = withQuarterGaps(
    data.filter((p) => p.ci95).map((p) => ({ quarter: p.quarter, value: p.value, lo: p.ci95![0], hi: p.ci95![1] })),
    range,
  ).map((p) => ('lo' in p ? p : { quarter: p.quarter, lo: null, hi: null }));
  return (
    <PlotFigure
      title={title}
      summary={summary}
      fileName={fileName}
      deps={[points, domain?.[0], domain?.[1], reference]}
      height={280}
      build={(width) => ({
        marginBottom: width < 640 ? 78 : 40,
        marginLeft: 56,
        x: { ...quarterAxis(width), domain: range, ...quarterTicks(range, width) },
        y: { label: yLabel, grid: true, domain, nice: !domain },
        marks: [
          Plot.areaY(band, { x: 'quarter', y1: 'lo', y2: 'hi', fill: CHART_COLORS[0], fillOpacity: 0.18, curve: 'linear' }),
          reference === undefined ? null : Plot.ruleY([reference], { stroke: MUTED, strokeDasharray: '4 3' }),
          Plot.lineY(line, { x: 'quarter', y: 'value', stroke: CHART_COLORS[0], strokeWidth: 2 }),
          Plot.dot(data, {
            x: 'quarter',
            y: 'value',
            fill: CHART_COLORS[0],
            r: 3,
            tip: true,
            title: (d: QuarterStat) => `${d.quarter}: ${num(d.value, 3)} (n = ${d.n})`,
          }),
        ],
      })}
    />
  );
}

/** Counts of class by class, with the counts written in the cells. */
export function ConfusionChart({
  confusion,
  title,
  xLabel,
  yLabel,
  fileName,
  summary,
}: {
  confusion: Confusion;
  title: string;
  xLabel: string;
  yLabel: string;
  fileName: string;
  summary: string;
}) {
  const cells = confusion.counts.flatMap((row, i) =>
    row.map((n, j) => ({ row: confusion.classes[i], column: confusion.classes[j], n, diagonal: i === j })),
  );
  const max = Math.max(1, ...cells.map((c) => c.n));
  return (
    <PlotFigure
      title={title}
      summary={summary}
      fileName={fileName}
      deps={[confusion]}
      build={(width) => {
        const size = Math.min(width, 520);
        return {
          width: size,
          height: size,
          marginLeft: 60,
          marginBottom: 48,
          padding: 0.04,
          x: { label: xLabel, domain: confusion.classes },
          y: { label: yLabel, domain: confusion.classes },
          color: { type: 'sqrt', range: ['#f7f5f0', CHART_COLORS[0]], domain: [0, max] },
          marks: [
            Plot.cell(cells, { x: 'column', y: 'row', fill: 'n', inset: 0.5 }),
            Plot.text(cells, {
              x: 'column',
              y: 'row',
              text: (d: { n: number }) => (d.n ? String(d.n) : ''),
              fill: (d: { n: number }) => (d.n > max * 0.45 ? 'white' : INK),
            }),
          ],
        };
      }}
    />
  );
}

export interface BoundaryBar {
  boundary: string;
  value: number | null;
  lo: number | null;
  hi: number | null;
  n: number;
}

/** Split rate per class boundary with its 95 % interval. */
export function BoundaryBars({
  bars,
  title,
  fileName,
  summary,
  yLabel = 'Split rate (%)',
}: {
  bars: BoundaryBar[];
  title: string;
  fileName: string;
  summary: string;
  yLabel?: string;
}) {
  const data = bars
    .filter((b) => b.value !== null)
    .map((b) => ({ ...b, value: b.value! * 100, lo: b.lo === null ? null : b.lo * 100, hi: b.hi === null ? null : b.hi * 100 }));
  return (
    <PlotFigure
      title={title}
      summary={summary}
      fileName={fileName}
      deps={[bars]}
      height={280}
      build={(width) => ({
        marginLeft: 56,
        ...pick(
          categoryAxis(
            bars.map((b) => b.boundary),
            width - 76,
          ),
          'marginBottom',
        ),
        x: {
          label: 'Class boundary (lower/upper class)',
          domain: bars.map((b) => b.boundary),
          padding: 0.25,
          ...omit(
            categoryAxis(
              bars.map((b) => b.boundary),
              width - 76,
            ),
            'marginBottom',
          ),
        },
        y: { label: yLabel, grid: true, domain: [0, Math.max(10, ...data.map((d) => d.hi ?? d.value)) * 1.05] },
        marks: [
          Plot.barY(data, {
            x: 'boundary',
            y: 'value',
            fill: CHART_COLORS[1],
            tip: true,
            title: (d: BoundaryBar) => `${d.boundary}: ${num(d.value, 1)} % of ${d.n}`,
          }),
          Plot.ruleX(
            data.filter((d) => d.lo !== null),
            { x: 'boundary', y1: 'lo', y2: 'hi', stroke: INK, strokeWidth: 1.5 },
          ),
          Plot.ruleY([0]),
        ],
      })}
    />
  );
}

/** Split rate of each boundary by quarter, one small panel per boundary. */
export function BoundaryTrend({
  trend,
  title,
  fileName,
  summary,
}: {
  trend: { quarter: string; boundary: string; value: number | null; n: number }[];
  title: string;
  fileName: string;
  summary: string;
}) {
  const quarters = quarterRange(trend.map((t) => t.quarter));
  const boundaries = [...new Set(trend.map((t) => t.boundary))];
  // Each boundary's series over every quarter of the span: a quarter without panels is a gap.
  const data = boundaries.flatMap((boundary) =>
    withQuarterGaps(
      trend.filter((t) => t.boundary === boundary && t.value !== null && t.n > 0).map((t) => ({ ...t, value: t.value! * 100 })),
      quarters,
    ).map((p) => ({ boundary, n: 0, ...p })),
  );
  const ticks = yearTicks(quarters);
  return (
    <PlotFigure
      title={title}
      summary={summary}
      fileName={fileName}
      deps={[trend]}
      build={(width) => ({
        height: 180 * Math.ceil(new Set(trend.map((t) => t.boundary)).size / (width < 700 ? 2 : 4)) + 60,
        marginLeft: 48,
        marginBottom: 40,
        fx: { axis: null },
        fy: { axis: null },
        x: {
          label: 'Quarter',
          labelAnchor: 'center',
          type: 'point',
          domain: quarters,
          ticks,
          tickFormat: yearTickFormat((width - 48) / (width < 700 ? 2 : 4) / Math.max(1, ticks.length)),
        },
        y: { label: 'Split rate (%)', grid: true, domain: [0, 100] },
        marks: facetGrid(data, width < 700 ? 2 : 4),
      })}
    />
  );
}

function facetGrid(data: { quarter: string; boundary: string; value: number | null }[], columns: number): Plot.Markish[] {
  const boundaries = [...new Set(data.map((d) => d.boundary))];
  const place = new Map(boundaries.map((b, i) => [b, { col: i % columns, row: Math.floor(i / columns) }]));
  const opts = { fx: (d: { boundary: string }) => place.get(d.boundary)!.col, fy: (d: { boundary: string }) => place.get(d.boundary)!.row };
  return [
    Plot.frame({ stroke: '#dcd8cf' }),
    Plot.lineY(data, { ...opts, x: 'quarter', y: 'value', stroke: CHART_COLORS[1], strokeWidth: 1.75 }),
    Plot.dot(
      data.filter((d) => d.value !== null),
      { ...opts, x: 'quarter', y: 'value', fill: CHART_COLORS[1], r: 2 },
    ),
    Plot.text(boundaries, {
      fx: (b: string) => place.get(b)!.col,
      fy: (b: string) => place.get(b)!.row,
      frameAnchor: 'top-left',
      dx: 6,
      dy: 6,
      text: (b: string) => `${b}`,
      fontWeight: 600,
      fill: INK,
    }),
  ];
}

/** A classifier's chronological deviations (dots) and the levels before and after the strongest change (lines). */
export function LevelChangeChart({
  points,
  change,
  title,
  fileName,
  summary,
}: {
  points: { index: number; deviation: number }[];
  change: { index: number; sizeBefore: number; sizeAfter: number } | null;
  title: string;
  fileName: string;
  summary: string;
}) {
  const n = points.length;
  const levels = change
    ? [
        { x1: 1, x2: change.index - 1, y: change.sizeBefore },
        { x1: change.index, x2: n, y: change.sizeAfter },
      ]
    : [];
  return (
    <PlotFigure
      title={title}
      summary={summary}
      fileName={fileName}
      deps={[points, change]}
      height={260}
      build={() => ({
        marginLeft: 56,
        x: { label: 'Rating number (chronological)', grid: false },
        y: { label: 'Deviation from the panel (points)', grid: true },
        marks: [
          Plot.ruleY([0], { stroke: MUTED }),
          Plot.dot(points, { x: 'index', y: 'deviation', r: 1.5, fill: CHART_COLORS[0], fillOpacity: 0.35 }),
          Plot.link(levels, { x1: 'x1', x2: 'x2', y1: 'y', y2: 'y', stroke: CHART_COLORS[1], strokeWidth: 3 }),
          ...(change ? [Plot.ruleX([change.index - 0.5], { stroke: '#a63d2f', strokeDasharray: '5 4' })] : []),
        ],
      })}
    >
      <Legend
        items={[
          { label: 'One rating’s deviation', color: CHART_COLORS[0] },
          { label: 'Mean level before and after the change', color: CHART_COLORS[1] },
          { label: 'Estimated change', color: '#a63d2f', dashed: true },
        ]}
      />
    </PlotFigure>
  );
}

export function Legend({ items }: { items: { label: string; color: string; dashed?: boolean }[] }) {
  return (
    <ul className="flex flex-wrap gap-x-4 gap-y-1 text-sm" aria-label="Legend">
      {items.map((item) => (
        <li key={item.label} className="flex items-center gap-1.5">
          <svg width="18" height="10" aria-hidden="true">
            <line x1="0" x2="18" y1="5" y2="5" stroke={item.color} strokeWidth="3" strokeDasharray={item.dashed ? '4 3' : undefined} />
          </svg>
          {item.label}
        </li>
      ))}
    </ul>
  );
}

/** One line per series over quarters (e.g. each classifier's bias); highlighted series in colour, the rest grey. */
export function MultiLineChart({
  series,
  title,
  yLabel,
  fileName,
  summary,
  highlight,
}: {
  series: { name: string; points: QuarterStat[] }[];
  title: string;
  yLabel: string;
  fileName: string;
  summary: string;
  highlight: string[];
}) {
  const quarters = quarterRange(series.flatMap((s) => s.points.map((p) => p.quarter)));
  // Every series over every quarter of the span: a missing quarter breaks that line.
  const lines = series.flatMap((s) =>
    withQuarterGaps(
      s.points.filter((p) => p.value !== null),
      quarters,
    ).map((p) => ({ name: s.name, quarter: p.quarter, value: p.value, n: 'n' in p ? p.n : 0 })),
  );
  const data = lines.filter((d): d is typeof d & { value: number } => d.value !== null);
  const colorOf = new Map(highlight.map((h, i) => [h, CHART_COLORS[i % 4]]));
  return (
    <PlotFigure
      title={title}
      summary={summary}
      fileName={fileName}
      deps={[series, highlight.join()]}
      height={320}
      build={(width) => ({
        marginLeft: 56,
        marginBottom: width < 640 ? 78 : 40,
        x: { ...quarterAxis(width), domain: quarters, ...quarterTicks(quarters, width) },
        y: { label: yLabel, grid: true },
        marks: [
          Plot.ruleY([0], { stroke: MUTED }),
          Plot.lineY(
            lines.filter((d) => !colorOf.has(d.name)),
            { x: 'quarter', y: 'value', z: 'name', stroke: '#c4c0b6', strokeWidth: 1 },
          ),
          Plot.lineY(
            lines.filter((d) => colorOf.has(d.name)),
            { x: 'quarter', y: 'value', z: 'name', stroke: (d: { name: string }) => colorOf.get(d.name)!, strokeWidth: 2.25 },
          ),
          Plot.tip(
            data,
            Plot.pointer({
              x: 'quarter',
              y: 'value',
              title: (d: { name: string; quarter: string; value: number; n: number }) =>
                `${d.name}, ${d.quarter}: ${formatPoints(d.value)} (n = ${d.n})`,
            }),
          ),
        ],
      })}
    >
      {highlight.length ? (
        <Legend items={[...highlight.map((h) => ({ label: h, color: colorOf.get(h)! })), { label: 'Others', color: '#c4c0b6' }]} />
      ) : null}
    </PlotFigure>
  );
}

/** The federation's values as unlabelled dots with one's own value marked. */
export function DistributionChart({
  values,
  own,
  title,
  xLabel,
  fileName,
  summary,
  domain,
}: {
  values: number[];
  own: number | null;
  title: string;
  xLabel: string;
  fileName: string;
  summary: string;
  domain?: [number, number];
}) {
  return (
    <PlotFigure
      title={title}
      summary={summary}
      fileName={fileName}
      deps={[values, own]}
      height={120}
      build={() => ({
        marginLeft: 20,
        marginBottom: 40,
        x: { label: xLabel, domain, nice: !domain },
        y: { axis: null },
        marks: [
          Plot.dotX(values, Plot.dodgeY({ x: (d: number) => d, r: 5, fill: '#c4c0b6', stroke: 'white', anchor: 'middle' })),
          own === null ? null : Plot.ruleX([own], { stroke: CHART_COLORS[1], strokeWidth: 3 }),
          own === null
            ? null
            : Plot.text([own], {
                x: (d: number) => d,
                frameAnchor: 'top',
                dy: -2,
                text: () => 'You',
                fill: INK,
                fontWeight: 700,
                lineAnchor: 'bottom',
              }),
        ],
      })}
    />
  );
}

/** Count of outcome classes per season, stacked (ordered classes in cividis). */
export function SeasonDistributionChart({
  seasons,
  classes,
  title,
  fileName,
  summary,
}: {
  seasons: { season: string; counts: Record<string, number> }[];
  classes: string[];
  title: string;
  fileName: string;
  summary: string;
}) {
  const data = seasons.flatMap((s) => classes.map((c) => ({ season: s.season, sportClass: c, n: s.counts[c] ?? 0 })));
  return (
    <PlotFigure
      title={title}
      summary={summary}
      fileName={fileName}
      deps={[seasons, classes]}
      height={300}
      build={(width) => ({
        marginLeft: 56,
        ...pick(
          categoryAxis(
            seasons.map((s) => s.season),
            width - 76,
          ),
          'marginBottom',
        ),
        x: {
          label: 'Season (July to June)',
          padding: 0.3,
          ...omit(
            categoryAxis(
              seasons.map((s) => s.season),
              width - 76,
            ),
            'marginBottom',
          ),
        },
        y: { label: 'Assessments (count)', grid: true },
        color: { type: 'ordinal', scheme: 'cividis', domain: classes, legend: false },
        marks: [
          Plot.barY(data, {
            x: 'season',
            y: 'n',
            fill: 'sportClass',
            order: classes,
            tip: true,
            title: (d: { season: string; sportClass: string; n: number }) => `${d.season}, class ${d.sportClass}: ${d.n}`,
          }),
          Plot.ruleY([0]),
        ],
      })}
    >
      <ClassSwatches classes={classes} />
    </PlotFigure>
  );
}

function ClassSwatches({ classes }: { classes: string[] }) {
  const scale = Plot.scale({ color: { type: 'ordinal', scheme: 'cividis', domain: classes } });
  return (
    <ul className="flex flex-wrap gap-x-3 gap-y-1 text-sm" aria-label="Sport classes">
      {classes.map((c) => (
        <li key={c} className="flex items-center gap-1">
          <span aria-hidden="true" className="inline-block h-3 w-3 rounded-sm" style={{ background: String(scale.apply(c)) }} />
          {c}
        </li>
      ))}
    </ul>
  );
}
