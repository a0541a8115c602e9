import { zodResolver } from '@hookform/resolvers/zod';
import { useId } from 'react';
import { useForm } from 'react-hook-form';
import { flagThresholdsSchema, type FlagThresholds, type FlagThresholdsInput } from '../../../../shared/schemas/analytics';
import { ApiError } from '../../../lib/api-client';
import { useSaveFlagSettings } from '../api/save-flag-settings';

type NumberField = Exclude<keyof FlagThresholds, 'driftEnabled' | 'notifyLead'>;

const FIELDS: { name: NumberField; label: string; hint: string; step: string }[] = [
  {
    name: 'falseDiscoveryRate',
    label: 'False-discovery rate per rule',
    hint: 'Benjamini–Hochberg control across the roster: 0.05 keeps chance flags to about 1 federation evaluation in 20 or fewer (decision record 0008).',
    step: '0.01',
  },
  {
    name: 'biasMin',
    label: 'Smallest lean worth a flag (points)',
    hint: 'Mean deviation from the rest of the panel, up or down; 0.25 is a quarter class, 0.5 a class step.',
    step: '0.01',
  },
  { name: 'biasWindow', label: 'Ratings for the lean', hint: 'The classifier’s most recent ratings in panels of two or more.', step: '1' },
  {
    name: 'agreementGap',
    label: 'Smallest shortfall in same-class agreement',
    hint: 'Below the other classifiers’ rate by at least this share (0.10 = 10 percentage points).',
    step: '0.01',
  },
  {
    name: 'agreementWindow',
    label: 'Ratings for the agreement',
    hint: 'The classifier’s most recent ratings in panels of two or more.',
    step: '1',
  },
  {
    name: 'driftMin',
    label: 'Smallest change of level worth a flag (points)',
    hint: 'After − before, compared with the classifier’s own earlier ratings.',
    step: '0.01',
  },
  {
    name: 'minRatings',
    label: 'Fewest ratings to judge',
    hint: 'Lean and agreement flags need at least this many ratings in their window.',
    step: '1',
  },
];

/** The lead's thresholds of the calibration flags (react-hook-form with the shared zod schema). */
export function FlagSettingsForm({ federation, initial }: { federation: string; initial: FlagThresholds }) {
  const id = useId();
  const save = useSaveFlagSettings(federation);
  const form = useForm<FlagThresholdsInput, unknown, FlagThresholds>({
    resolver: zodResolver(flagThresholdsSchema),
    defaultValues: initial,
  });
  const { errors, isDirty } = form.formState;
  const serverError = save.error instanceof ApiError ? save.error : null;
  return (
    <form
      noValidate
      className="card space-y-4"
      aria-labelledby={`${id}-title`}
      onSubmit={form.handleSubmit((values) => save.mutate(values, { onSuccess: (saved) => form.reset(saved) }))}
    >
      <h2 id={`${id}-title`}>Thresholds</h2>
      <p className="text-sm text-muted">
        Flags are evaluated on all of the federation’s ratings after every import, when these thresholds are saved, and on demand.
      </p>
      <div className="grid gap-4 sm:grid-cols-2">
        {FIELDS.map((f) => (
          <div key={f.name} className="field">
            <label htmlFor={`${id}-${f.name}`}>{f.label}</label>
            <input
              id={`${id}-${f.name}`}
              className="input"
              type="number"
              step={f.step}
              inputMode="decimal"
              aria-invalid={errors[f.name] ? 'true' : undefined}
              aria-describedby={`${id}-${f.name}-hint${errors[f.name] ? ` ${id}-${f.name}-error` : ''}`}
              {...form.register(f.name)}
            />
            <span id={`${id}-${f.name}-hint`} className="text-sm text-muted">
              {f.hint}
            </span>
            {errors[f.name] ? (
              <span id={`${id}-${f.name}-error`} className="field-error" role="alert">
                {f.label}: {String(errors[f.name]?.message)}
              </span>
            ) : null}
          </div>
        ))}
      </div>
      <div className="flex flex-wrap gap-6">
        <label className="flex items-center gap-2 font-semibold">
          <input type="checkbox" className="h-5 w-5" {...form.register('driftEnabled')} /> Raise drift flags
        </label>
        <label className="flex items-center gap-2 font-semibold">
          <input type="checkbox" className="h-5 w-5" {...form.register('notifyLead')} /> E-mail the leads when flags open or stop holding
        </label>
      </div>
      {serverError ? (
        <p role="alert" className="field-error">
          {serverError.message}
          {Array.isArray(serverError.details)
            ? `: ${(serverError.details as { path: string; message: string }[]).map((d) => `${d.path} ${d.message}`).join('; ')}`
            : ''}
        </p>
      ) : null}
      <div className="flex items-center gap-3">
        <button type="submit" className="btn btn-primary" disabled={save.isPending}>
          {save.isPending ? 'Saving…' : 'Save thresholds'}
        </button>
        {save.isSuccess && !isDirty ? (
          <span role="status" className="text-sm text-ok">
            Saved; flags re-evaluated.
          </span>
        ) : null}
      </div>
    </form>
  );
}
