import type { QuarterStat } from '../../../../shared/schemas/analytics';
import { num } from '../../../lib/stat-format';

/**
 * A small inline trend of quarterly values for table rows (a table decoration: its numbers are in
 * the row's CSV and the full chart is on the classifier's page). Zero is drawn as a baseline.
 */
export function Sparkline({ points, label, range = 0.6 }: { points: QuarterStat[]; label: string; range?: number }) {
  const values = points.filter((p) => p.value !== null) as (QuarterStat & { value: number })[];
  const w = 96;
  const h = 28;
  if (values.length < 2) return <span className="text-muted">—</span>;
  const x = (i: number) => 2 + (i * (w - 4)) / (values.length - 1);
  const y = (v: number) => h / 2 - (Math.max(-range, Math.min(range, v)) / range) * (h / 2 - 2);
  const d = values.map((p, i) => `${i === 0 ? 'M' : 'L'}${x(i).toFixed(1)},${y(p.value).toFixed(1)}`).join(' ');
  const first = values[0];
  const last = values[values.length - 1];
  return (
    <svg
      width={w}
      height={h}
      role="img"
      aria-label={`${label}: ${num(first.value)} in ${first.quarter}, ${num(last.value)} in ${last.quarter}`}
    >
      <line x1={0} x2={w} y1={h / 2} y2={h / 2} stroke="#dcd8cf" />
      <path d={d} fill="none" stroke="#2f6690" strokeWidth={1.5} />
      <circle cx={x(values.length - 1)} cy={y(last.value)} r={2.5} fill="#d9822b" />
    </svg>
  );
}
