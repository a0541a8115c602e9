import { zodResolver } from '@hookform/resolvers/zod';
import { useId } from 'react';
import { useForm } from 'react-hook-form';
import {
  createStudySchema,
  exportSettingsSchema,
  type CreateStudy,
  type ExportSettings,
  type ExportSettingsView,
} from '../../../../shared/schemas/exports';
import { useConfirm } from '../../../components/confirm-dialog';
import { QueryState } from '../../../components/query-state';
import { ApiError } from '../../../lib/api-client';
import { useCloseStudy } from '../api/close-study';
import { useCreateStudy } from '../api/create-study';
import { useExportSettings } from '../api/get-export-settings';
import { useSaveExportSettings } from '../api/save-export-settings';

function ServerError({ error }: { error: unknown }) {
  if (!error) return null;
  const message = error instanceof ApiError ? error.message : 'Something went wrong. Try again.';
  return (
    <p role="alert" className="field-error">
      {message}
    </p>
  );
}

type SettingsField = 'minAthletes' | 'maxExportsPerDay' | 'maxStoredMegabytes';

const SETTINGS_FIELDS: { name: SettingsField; label: string; short: string; min: number; max: number }[] = [
  {
    name: 'minAthletes',
    label: 'Fewest athletes a cell (quarter × kind × category), an exported category or a combination may describe',
    short: 'k',
    min: 2,
    max: 100,
  },
  { name: 'maxExportsPerDay', label: 'Exports each researcher may make in any 24 hours', short: 'Exports a day', min: 1, max: 1000 },
  {
    name: 'maxStoredMegabytes',
    label: 'Megabytes of compressed files each researcher may keep at once',
    short: 'Megabytes kept',
    min: 1,
    max: 100000,
  },
];

function KForm({ federation, initial }: { federation: string; initial: ExportSettingsView }) {
  const id = useId();
  const save = useSaveExportSettings(federation);
  const valuesOf = (v: ExportSettingsView): ExportSettings => ({
    minAthletes: v.minAthletes,
    maxExportsPerDay: v.maxExportsPerDay,
    maxStoredMegabytes: v.maxStoredMegabytes,
  });
  const form = useForm<ExportSettings>({ resolver: zodResolver(exportSettingsSchema), defaultValues: valuesOf(initial) });
  return (
    <form
      noValidate
      className="space-y-3"
      aria-labelledby={`${id}-title`}
      onSubmit={form.handleSubmit((values) => save.mutate(values, { onSuccess: (saved) => form.reset(valuesOf(saved)) }))}
    >
      <h3 id={`${id}-title`}>Smallest cell (k) and each researcher’s quota</h3>
      <p className="text-sm text-muted">
        Researchers’ dashboards and every export leave out the cells held by fewer than k athletes, and an export that differs from an
        earlier one by fewer than k athletes is refused.
      </p>
      {SETTINGS_FIELDS.map((f) => {
        const error = form.formState.errors[f.name];
        return (
          <div className="field" key={f.name}>
            <label htmlFor={`${id}-${f.name}`}>{f.label}</label>
            <input
              id={`${id}-${f.name}`}
              type="number"
              min={f.min}
              max={f.max}
              className="input w-32"
              aria-invalid={error ? 'true' : undefined}
              aria-describedby={error ? `${id}-${f.name}-error` : undefined}
              {...form.register(f.name, { valueAsNumber: true })}
            />
            {error ? (
              <span id={`${id}-${f.name}-error`} className="field-error" role="alert">
                {f.short}: {error.message}
              </span>
            ) : null}
          </div>
        );
      })}
      <ServerError error={save.error} />
      <button type="submit" className="btn btn-primary" disabled={save.isPending}>
        {save.isPending ? 'Saving…' : 'Save settings'}
      </button>
      {save.isSuccess && !form.formState.isDirty ? (
        <span className="ml-3 text-sm text-ok" role="status">
          Saved.
        </span>
      ) : null}
    </form>
  );
}

function StudyForm({ federation }: { federation: string }) {
  const id = useId();
  const create = useCreateStudy(federation);
  const form = useForm<CreateStudy>({ resolver: zodResolver(createStudySchema), defaultValues: { name: '', purpose: '' } });
  const { errors } = form.formState;
  return (
    <form
      noValidate
      className="space-y-3"
      aria-labelledby={`${id}-title`}
      onSubmit={form.handleSubmit((values) => create.mutate(values, { onSuccess: () => form.reset() }))}
    >
      <h3 id={`${id}-title`}>New study</h3>
      <p className="text-sm text-muted">
        A study has one stable key: every export made under it uses the same pseudonyms, so its exports can be joined.
      </p>
      <div className="field">
        <label htmlFor={`${id}-name`}>Study name</label>
        <input
          id={`${id}-name`}
          className="input"
          aria-invalid={errors.name ? 'true' : undefined}
          aria-describedby={errors.name ? `${id}-name-error` : undefined}
          {...form.register('name')}
        />
        {errors.name ? (
          <span id={`${id}-name-error`} className="field-error" role="alert">
            Study name: {errors.name.message}
          </span>
        ) : null}
      </div>
      <div className="field">
        <label htmlFor={`${id}-purpose`}>Purpose (optional)</label>
        <textarea id={`${id}-purpose`} rows={2} className="input" {...form.register('purpose')} />
      </div>
      <ServerError error={create.error} />
      <button type="submit" className="btn btn-primary" disabled={create.isPending}>
        {create.isPending ? 'Creating…' : 'Create study'}
      </button>
    </form>
  );
}

/** Lead-only: k, the researchers' quota and the studies that allow a stable key. */
export function ExportSettingsPanel({ federation }: { federation: string }) {
  const settings = useExportSettings(federation);
  const close = useCloseStudy(federation);
  const { confirm, dialog } = useConfirm();
  return (
    <section className="card space-y-6" aria-labelledby="export-settings-title">
      {dialog}
      <h2 id="export-settings-title">Export settings (leads only)</h2>
      <QueryState query={settings} what="The export settings">
        {(data) => (
          <KForm key={`${data.minAthletes}-${data.maxExportsPerDay}-${data.maxStoredMegabytes}`} federation={federation} initial={data} />
        )}
      </QueryState>
      <StudyForm federation={federation} />
      {settings.data && settings.data.studies.length > 0 ? (
        <div className="space-y-2">
          <h3>Studies</h3>
          <ul className="divide-y divide-line">
            {settings.data.studies.map((s) => (
              <li key={s.id} className="flex flex-wrap items-center justify-between gap-3 py-2">
                <span>
                  <span className="font-semibold">{s.name}</span>
                  {s.purpose ? <span className="block text-sm text-muted">{s.purpose}</span> : null}
                </span>
                {s.closedAt ? (
                  <span className="text-sm text-muted">Closed</span>
                ) : (
                  <button
                    type="button"
                    className="btn btn-quiet min-h-10 py-1.5"
                    disabled={close.isPending}
                    onClick={async () => {
                      const ok = await confirm({
                        title: `Close the study “${s.name}”?`,
                        consequence: (
                          <p>
                            Its stable key can no longer be used: no new export can be made under it, so later exports cannot be joined with
                            its earlier ones. Exports already built stay downloadable until they expire. A closed study cannot be reopened.
                          </p>
                        ),
                        confirmLabel: 'Close the study',
                      });
                      if (ok) close.mutate(s.id);
                    }}
                  >
                    Close {s.name}
                  </button>
                )}
              </li>
            ))}
          </ul>
          <ServerError error={close.error} />
        </div>
      ) : null}
    </section>
  );
}
