import { useId, useState } from 'react';
import {
  DATE_FORMAT_LABELS,
  DATE_FORMATS,
  targetChoices,
  targetLabel,
  type ColumnMapping,
  type ColumnTarget,
  type DateFormat,
  type ImportLayout,
} from '../../../../shared/import-columns';
import type { SavedMapping } from '../../../../shared/schemas/imports';
import { ApiError } from '../../../lib/api-client';
import { useSaveMapping } from '../api/save-mapping';

export interface MappingState {
  layout: ImportLayout;
  mapping: ColumnMapping;
  dateFormat: DateFormat;
  addClassifiers: boolean;
}

interface Props {
  federation: string;
  headers: string[];
  state: MappingState;
  onChange: (state: MappingState) => void;
  saved: SavedMapping[];
  /** Headers the lead must still map (shown as errors after a check was asked for). */
  unmapped: string[];
}

/** The mapping step: what each column of the file holds, the date format, saved mappings. */
export function ColumnMapping({ federation, headers, state, onChange, saved, unmapped }: Props) {
  const ids = useId();
  const [name, setName] = useState('');
  const save = useSaveMapping(federation);
  const set = (patch: Partial<MappingState>) => onChange({ ...state, ...patch });
  const setTarget = (header: string, target: ColumnTarget | '') => {
    const mapping = { ...state.mapping };
    if (target === '') delete mapping[header];
    else mapping[header] = target;
    set({ mapping });
  };
  const apply = (id: string) => {
    const chosen = saved.find((m) => String(m.id) === id);
    if (!chosen) return;
    const mapping: ColumnMapping = { ...state.mapping };
    for (const h of headers) if (chosen.mapping[h] !== undefined) mapping[h] = chosen.mapping[h]!;
    set({ mapping, layout: chosen.layout, dateFormat: chosen.dateFormat });
    setName(chosen.name);
  };

  return (
    <div className="space-y-5">
      <fieldset className="space-y-2">
        <legend className="font-semibold">Layout</legend>
        <div className="flex flex-wrap gap-4">
          {(['long', 'wide'] as const).map((layout) => (
            <label key={layout} className="flex items-center gap-2">
              <input
                type="radio"
                name={`${ids}-layout`}
                value={layout}
                checked={state.layout === layout}
                onChange={() => set({ layout })}
              />
              {layout === 'long' ? 'Long: one row per rating' : 'Wide: one row per assessment'}
            </label>
          ))}
        </div>
      </fieldset>

      {saved.length > 0 ? (
        <div className="field max-w-sm">
          <label htmlFor={`${ids}-saved`}>Use a saved mapping</label>
          <select id={`${ids}-saved`} className="input" defaultValue="" onChange={(e) => apply(e.target.value)}>
            <option value="">Choose a saved mapping…</option>
            {saved.map((m) => (
              <option key={m.id} value={m.id}>
                {m.name}
              </option>
            ))}
          </select>
        </div>
      ) : null}

      <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
        {headers.map((header, i) => {
          if (header === '') return null;
          const id = `${ids}-col-${i}`;
          const missing = unmapped.includes(header);
          return (
            <div key={`${header}-${i}`} className="field">
              <label htmlFor={id}>Column “{header}”</label>
              <select
                id={id}
                className="input"
                value={state.mapping[header] ?? ''}
                aria-invalid={missing}
                aria-describedby={missing ? `${id}-error` : undefined}
                onChange={(e) => setTarget(header, e.target.value as ColumnTarget | '')}
              >
                <option value="">Choose what it holds…</option>
                {targetChoices(state.layout, header).map((t) => (
                  <option key={t} value={t}>
                    {targetLabel(t)}
                  </option>
                ))}
                {state.mapping[header] && !targetChoices(state.layout, header).includes(state.mapping[header]) ? (
                  <option value={state.mapping[header]}>{targetLabel(state.mapping[header])}</option>
                ) : null}
              </select>
              {missing ? (
                <p id={`${id}-error`} className="field-error">
                  Choose what this column holds, or ignore it.
                </p>
              ) : null}
            </div>
          );
        })}
      </div>

      <div className="flex flex-wrap items-end gap-4">
        <div className="field">
          <label htmlFor={`${ids}-date`}>Dates are written as</label>
          <select
            id={`${ids}-date`}
            className="input"
            value={state.dateFormat}
            onChange={(e) => set({ dateFormat: e.target.value as DateFormat })}
          >
            {DATE_FORMATS.map((f) => (
              <option key={f} value={f}>
                {DATE_FORMAT_LABELS[f]}
              </option>
            ))}
          </select>
        </div>
        <label className="flex min-h-11 items-center gap-2">
          <input type="checkbox" checked={state.addClassifiers} onChange={(e) => set({ addClassifiers: e.target.checked })} />
          Add classifier codes the roster does not have yet
        </label>
      </div>

      <form
        className="flex flex-wrap items-end gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          save.mutate({ name, mapping: state.mapping, dateFormat: state.dateFormat });
        }}
      >
        <div className="field">
          <label htmlFor={`${ids}-name`}>Save this mapping as</label>
          <input id={`${ids}-name`} className="input" value={name} maxLength={80} onChange={(e) => setName(e.target.value)} />
        </div>
        <button type="submit" className="btn btn-quiet" disabled={save.isPending || name.trim() === ''}>
          Save mapping
        </button>
        <p role="status" className="text-sm text-muted">
          {save.isSuccess ? `Saved as “${save.data.name}” for the next upload.` : ''}
          {save.error ? (
            <span className="field-error">{save.error instanceof ApiError ? save.error.message : 'The mapping was not saved.'}</span>
          ) : null}
        </p>
      </form>
    </div>
  );
}
