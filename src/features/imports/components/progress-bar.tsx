import { useId } from 'react';

/** A labelled progress bar; without a value it shows that work goes on without saying how far. */
export function ProgressBar({ label, value }: { label: string; value: number | null }) {
  const id = useId();
  const percent = value === null ? null : Math.max(0, Math.min(100, Math.round(value * 100)));
  return (
    <div className="space-y-1.5">
      <div id={id} className="flex justify-between text-sm">
        <span>{label}</span>
        {percent !== null ? <span className="tabular-nums text-muted">{percent}%</span> : null}
      </div>
      <div
        role="progressbar"
        aria-labelledby={id}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={percent ?? undefined}
        aria-valuetext={percent === null ? 'in progress' : `${percent}%`}
        className="h-3 overflow-hidden rounded-full bg-harbour-soft"
      >
        <div
          className={`h-full rounded-full bg-harbour transition-[width] duration-200 ${percent === null ? 'w-2/5 animate-pulse' : ''}`}
          style={percent === null ? undefined : { width: `${percent}%` }}
        />
      </div>
    </div>
  );
}
