import type { CalibrationFlag } from '../../../../shared/schemas/analytics';

/** "No longer met" with the date and reason, for a flag whose condition stopped holding; nothing while it holds. */
export function FlagLapse({ flag }: { flag: Pick<CalibrationFlag, 'stillMet' | 'lapsedAt' | 'lapseReason' | 'status'> }) {
  if (flag.stillMet || flag.status === 'closed') return null;
  return (
    <p className="text-sm font-semibold text-muted" data-testid="flag-lapsed">
      No longer met{flag.lapsedAt ? ` since ${flag.lapsedAt.slice(0, 10)}` : ''}. {flag.lapseReason ?? ''} The figures below are today’s.
    </p>
  );
}
