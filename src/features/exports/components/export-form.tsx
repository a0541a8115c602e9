import { zodResolver } from '@hookform/resolvers/zod';
import { useId } from 'react';
import { useForm, type FieldError } from 'react-hook-form';
import { ASSESSMENT_KIND_LABELS } from '../../../../shared/schemas/common';
import {
  DATE_MODE_LABELS,
  EXPORT_FIELDS,
  EXPORT_FIELD_LABELS,
  exportFormSchema,
  type ExportForm as ExportFormValues,
  type ExportOptions,
  type ExportRequest,
  type ExportView,
} from '../../../../shared/schemas/exports';
import { ApiError } from '../../../lib/api-client';
import { formatCount, formatEventLevel, formatSeason } from '../../../lib/format';
import { useCreateExport } from '../api/create-export';
import { ExportFiles } from './export-files';

interface CheckGroupProps {
  legend: string;
  hint?: string;
  name: 'scope.seasons' | 'scope.eventLevels' | 'scope.categories' | 'scope.kinds' | 'fields';
  options: { value: string; label: string }[];
  register: ReturnType<typeof useForm<ExportFormValues>>['register'];
  error?: FieldError;
}

function CheckGroup({ legend, hint, name, options, register, error }: CheckGroupProps) {
  const id = useId();
  return (
    <fieldset className="space-y-2" aria-describedby={error ? `${id}-error` : hint ? `${id}-hint` : undefined}>
      <legend className="text-sm font-semibold">{legend}</legend>
      {hint ? (
        <p id={`${id}-hint`} className="text-sm text-muted">
          {hint}
        </p>
      ) : null}
      <div className="flex flex-wrap gap-x-5 gap-y-2">
        {options.map((o) => (
          <label key={o.value} className="flex min-h-8 items-center gap-2">
            <input type="checkbox" className="h-5 w-5" value={o.value} {...register(name)} />
            {o.label}
          </label>
        ))}
      </div>
      {error ? (
        <p id={`${id}-error`} className="field-error" role="alert">
          {legend}: {error.message}
        </p>
      ) : null}
    </fieldset>
  );
}

/** The build form: scope, fields, dates and study (react-hook-form with the shared zod schema). */
export function ExportForm({ federation, options, isLead }: { federation: string; options: ExportOptions; isLead: boolean }) {
  const id = useId();
  const create = useCreateExport(federation);
  const form = useForm<ExportFormValues>({
    resolver: zodResolver(exportFormSchema),
    defaultValues: {
      scope: {
        seasons: options.seasons,
        eventLevels: options.eventLevels,
        categories: options.categories,
        kinds: options.kinds,
        eventIds: [],
      },
      fields: [...EXPORT_FIELDS],
      dateMode: 'month',
      studyId: '',
    },
  });
  const { errors } = form.formState;
  const serverError =
    create.error instanceof ApiError
      ? create.error
      : create.error
        ? new ApiError(0, 'unknown', 'The export could not be built. Try again.')
        : null;

  const onSubmit = form.handleSubmit((values) => {
    const body: ExportRequest = {
      scope: {
        seasons: values.scope.seasons,
        eventLevels: values.scope.eventLevels,
        categories: values.scope.categories,
        kinds: values.scope.kinds,
        ...(values.scope.eventIds.length > 0 ? { eventIds: values.scope.eventIds.map(Number) } : {}),
      },
      fields: values.fields,
      dateMode: values.dateMode,
      studyId: values.studyId === '' ? null : Number(values.studyId),
    };
    create.mutate(body);
  });

  return (
    <div className="space-y-4">
      <form noValidate onSubmit={onSubmit} className="card space-y-5" aria-labelledby={`${id}-title`}>
        <h2 id={`${id}-title`}>Build an export</h2>
        <p className="text-sm text-muted">
          One row per rating, in CSV and JSON, with a data dictionary. Athletes, classifiers, events and assessments are replaced by
          pseudonyms; names, codes, notes and exact dates never leave. Combinations held by fewer than {options.minAthletes} athletes are
          blanked.
        </p>
        <CheckGroup
          legend="Seasons"
          hint="1 July to 30 June."
          name="scope.seasons"
          options={options.seasons.map((s) => ({ value: s, label: formatSeason(s) }))}
          register={form.register}
          error={errors.scope?.seasons as FieldError | undefined}
        />
        <CheckGroup
          legend="Event levels"
          hint={
            isLead
              ? 'Events are chosen by level; as a lead you can also narrow to individual events below.'
              : 'Events are chosen by level: individual events are not listed for researchers.'
          }
          name="scope.eventLevels"
          options={options.eventLevels.map((l) => ({ value: l, label: formatEventLevel(l) }))}
          register={form.register}
          error={errors.scope?.eventLevels as FieldError | undefined}
        />
        {isLead && options.events.length > 0 ? (
          <div className="field">
            <label htmlFor={`${id}-events`}>Individual events (optional, leads only)</label>
            <select
              id={`${id}-events`}
              multiple
              size={6}
              className="input"
              aria-describedby={`${id}-events-hint`}
              {...form.register('scope.eventIds')}
            >
              {options.events.map((e) => (
                <option key={e.id} value={String(e.id)}>
                  {e.code} · {e.name}
                </option>
              ))}
            </select>
            <span id={`${id}-events-hint`} className="text-sm text-muted">
              None selected: every event of the chosen levels. The export itself names no event.
            </span>
          </div>
        ) : null}
        <CheckGroup
          legend="Competition categories"
          name="scope.categories"
          options={options.categories.map((c) => ({ value: c, label: c }))}
          register={form.register}
          error={errors.scope?.categories as FieldError | undefined}
        />
        <CheckGroup
          legend="Assessment kinds"
          name="scope.kinds"
          options={options.kinds.map((k) => ({ value: k, label: ASSESSMENT_KIND_LABELS[k] }))}
          register={form.register}
          error={errors.scope?.kinds as FieldError | undefined}
        />
        <CheckGroup
          legend="Columns"
          hint="Assessment, classifier and sport class are always included."
          name="fields"
          options={EXPORT_FIELDS.map((f) => ({ value: f, label: EXPORT_FIELD_LABELS[f] }))}
          register={form.register}
          error={errors.fields as FieldError | undefined}
        />
        <fieldset className="space-y-2">
          <legend className="text-sm font-semibold">Dates</legend>
          {(['month', 'offset'] as const).map((mode) => (
            <label key={mode} className="flex min-h-8 items-center gap-2">
              <input type="radio" className="h-5 w-5" value={mode} {...form.register('dateMode')} />
              {DATE_MODE_LABELS[mode]}
            </label>
          ))}
        </fieldset>
        <div className="field">
          <label htmlFor={`${id}-study`}>Study</label>
          <select id={`${id}-study`} className="input" aria-describedby={`${id}-study-hint`} {...form.register('studyId')}>
            <option value="">None: pseudonyms of this export alone</option>
            {options.studies.map((s) => (
              <option key={s.id} value={String(s.id)}>
                {s.name}
              </option>
            ))}
          </select>
          <span id={`${id}-study-hint`} className="text-sm text-muted">
            Exports of one study share pseudonyms and can be joined; without a study, no two exports can.
          </span>
        </div>
        {serverError ? (
          <p role="alert" className="field-error">
            {serverError.message}
            {Array.isArray(serverError.details)
              ? `: ${(serverError.details as { path: string; message: string }[]).map((d) => `${d.path} ${d.message}`).join('; ')}`
              : ''}
          </p>
        ) : null}
        <button type="submit" className="btn btn-primary" disabled={create.isPending}>
          {create.isPending ? 'Building…' : 'Build export'}
        </button>
      </form>
      {create.data ? <ExportReady view={create.data} /> : null}
    </div>
  );
}

function ExportReady({ view }: { view: ExportView }) {
  const s = view.counts.suppressed;
  return (
    <section className="card space-y-3" aria-labelledby="export-ready-title" role="status">
      <h2 id="export-ready-title">Export {view.id} is ready</h2>
      <p>
        {formatCount(view.counts.rows, 'row')}: {formatCount(view.counts.assessments, 'assessment')},{' '}
        {formatCount(view.counts.athletes, 'athlete')}, {formatCount(view.counts.classifiers, 'classifier')}. Blanked for k ={' '}
        {view.minAthletes}: categories of {s.categoryAthletes} athletes ({s.categoryRows} rows), attributes of {s.combinationAssessments}{' '}
        assessments ({s.combinationRows} rows). No row was dropped.
      </p>
      <ExportFiles view={view} />
    </section>
  );
}
