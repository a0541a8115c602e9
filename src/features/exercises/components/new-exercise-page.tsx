import { useEffect, useId, useState } from 'react';
import { Link, useNavigate, useSearchParams } from 'react-router';
import { SKILL_LABELS, SKILLS, type ExerciseInput, type Skill } from '../../../../shared/schemas/exercises';
import { DEFAULT_SCALE, formatClass, scaleClasses } from '../../../../shared/scale';
import { usePageTitle } from '../../../lib/page-title';
import { useCurrentFederation } from '../../../lib/use-federation';
import { ErrorNotice, Loading } from '../../../components/status';
import { ApiError } from '../../../lib/api-client';
import { useClassifiers } from '../../dashboards/api/get-classifiers';
import { useFlags } from '../../dashboards/api/get-flags';
import { useCreateExercise } from '../api/create-exercise';
import { useExercises } from '../api/get-exercises';
import { useProposal, type ProposalSource } from '../api/get-proposal';

interface CaseDraft {
  description: string;
  videoUrl: string;
  skills: Skill[];
  referenceClass: number;
}

const emptyCase = (): CaseDraft => ({ description: '', videoUrl: '', skills: [], referenceClass: 6 });
const isoDay = (offsetDays: number) => new Date(Date.now() + offsetDays * 86_400_000).toISOString().slice(0, 10);

/** Field errors of a refused request, by path ("cases.0.videoUrl" → message). */
function fieldErrors(error: unknown): Map<string, string> {
  const out = new Map<string, string>();
  if (error instanceof ApiError && Array.isArray(error.details)) {
    for (const d of error.details as { path?: string; message?: string }[]) if (d.path && d.message) out.set(d.path, d.message);
  }
  return out;
}

/** A lead creates a draft exercise, blank or started from a flag or a class boundary. */
export function NewExercisePage() {
  usePageTitle('New exercise');
  const { federation } = useCurrentFederation();
  const navigate = useNavigate();
  const [params] = useSearchParams();
  const initialSource: ProposalSource | null = params.get('flag')
    ? { flag: Number(params.get('flag')) }
    : params.get('boundary')
      ? { boundary: Number(params.get('boundary')) }
      : null;
  const [source, setSource] = useState<ProposalSource | null>(initialSource);
  const proposal = useProposal(federation.slug, source);
  const flags = useFlags(federation.slug);
  const roster = useClassifiers(federation.slug, {});
  const create = useCreateExercise(federation.slug);
  const scale = useExercises(federation.slug).data?.scale ?? DEFAULT_SCALE;

  const [title, setTitle] = useState('');
  const [opensOn, setOpensOn] = useState(isoDay(0));
  const [closesOn, setClosesOn] = useState(isoDay(14));
  const [codes, setCodes] = useState<string[]>([]);
  const [cases, setCases] = useState<CaseDraft[]>([emptyCase()]);
  const [note, setNote] = useState<string | null>(null);
  const id = useId();

  useEffect(() => {
    const p = proposal.data;
    if (!p) return;
    setTitle(p.title);
    setCodes(p.classifierCodes);
    setCases(
      p.cases.length
        ? p.cases.map((c) => ({
            description: c.description,
            videoUrl: c.videoUrl ?? '',
            skills: c.skills,
            referenceClass: c.referenceClass,
          }))
        : [emptyCase()],
    );
    setNote(p.note);
  }, [proposal.data]);

  const errors = fieldErrors(create.error);
  const sourceValue = source === null ? '' : 'flag' in source ? `flag:${source.flag}` : `boundary:${source.boundary}`;
  const setCase = (i: number, patch: Partial<CaseDraft>) => setCases((all) => all.map((c, j) => (j === i ? { ...c, ...patch } : c)));

  const submit = (e: React.FormEvent) => {
    e.preventDefault();
    const input: ExerciseInput = {
      title,
      opensOn,
      closesOn,
      classifierCodes: codes,
      cases: cases.map((c) => ({
        description: c.description,
        videoUrl: c.videoUrl.trim() === '' ? null : c.videoUrl.trim(),
        skills: c.skills,
        referenceClass: c.referenceClass,
      })),
      source:
        source === null
          ? null
          : 'flag' in source
            ? { kind: 'flag', ref: String(source.flag) }
            : { kind: 'boundary', ref: String(source.boundary) },
    };
    create.mutate(input, { onSuccess: (detail) => void navigate(`../${detail.id}`, { relative: 'path' }) });
  };

  const activeFlags = (flags.data?.flags ?? []).filter((f) => f.status !== 'closed');
  const boundaries = scaleClasses(scale).slice(0, -1);

  return (
    <div className="space-y-6">
      <div className="space-y-1">
        <p>
          <Link to=".." relative="path" className="text-sm text-harbour underline">
            ← Exercises
          </Link>
        </p>
        <h1>New exercise</h1>
        <p className="max-w-3xl text-muted">
          Cases to watch, each with the class a senior panel agreed. Nothing is sent until you open the exercise; classifiers never see the
          reference classes before the close.
        </p>
      </div>

      <section className="card space-y-3" aria-labelledby={`${id}-start`}>
        <h2 id={`${id}-start`}>Start from</h2>
        <div className="field max-w-xl">
          <label htmlFor={`${id}-source`}>A calibration flag or a class boundary (fills in cases and classifiers)</label>
          <select
            id={`${id}-source`}
            className="input"
            value={sourceValue}
            onChange={(e) => {
              const [kind, value] = e.target.value.split(':');
              setSource(kind === 'flag' ? { flag: Number(value) } : kind === 'boundary' ? { boundary: Number(value) } : null);
            }}
          >
            <option value="">Nothing: a blank exercise</option>
            <optgroup label="Open calibration flags">
              {activeFlags.map((f) => (
                <option key={f.id} value={`flag:${f.id}`}>
                  {f.classifierCode} {f.classifierName ?? ''} — {f.rule} flag #{f.id}
                </option>
              ))}
            </optgroup>
            <optgroup label="Class boundaries">
              {boundaries.map((b) => (
                <option key={b} value={`boundary:${b}`}>
                  {formatClass(b)}/{formatClass(b + 1)}
                </option>
              ))}
            </optgroup>
          </select>
        </div>
        {proposal.isFetching ? <Loading label="Finding cases…" /> : null}
        {proposal.isError ? <ErrorNotice error={proposal.error} /> : null}
        {note ? <p className="caution">{note} Replace each generated description with what the video shows.</p> : null}
      </section>

      <form className="space-y-6" onSubmit={submit} noValidate>
        <section className="card space-y-4" aria-labelledby={`${id}-about`}>
          <h2 id={`${id}-about`}>Exercise</h2>
          <div className="field">
            <label htmlFor={`${id}-title`}>Title</label>
            <input
              id={`${id}-title`}
              className="input"
              value={title}
              onChange={(e) => setTitle(e.target.value)}
              aria-invalid={errors.has('title') ? 'true' : undefined}
            />
            {errors.has('title') ? <p className="field-error">{errors.get('title')}</p> : null}
          </div>
          <div className="grid gap-4 sm:grid-cols-2">
            <div className="field">
              <label htmlFor={`${id}-opens`}>Opens on</label>
              <input id={`${id}-opens`} type="date" className="input" value={opensOn} onChange={(e) => setOpensOn(e.target.value)} />
            </div>
            <div className="field">
              <label htmlFor={`${id}-closes`}>Closes on (end of day, UTC)</label>
              <input
                id={`${id}-closes`}
                type="date"
                className="input"
                value={closesOn}
                onChange={(e) => setClosesOn(e.target.value)}
                aria-invalid={errors.has('closesOn') ? 'true' : undefined}
              />
              {errors.has('closesOn') ? <p className="field-error">{errors.get('closesOn')}</p> : null}
            </div>
          </div>
          <fieldset className="space-y-2">
            <legend className="text-sm font-semibold">Classifiers assigned</legend>
            {roster.isPending ? <Loading /> : null}
            <div className="grid gap-1 sm:grid-cols-2 lg:grid-cols-3">
              {(roster.data?.classifiers ?? []).map((c) => (
                <label key={c.code} className="flex min-h-9 items-center gap-2 text-sm">
                  <input
                    type="checkbox"
                    checked={codes.includes(c.code)}
                    onChange={(e) => setCodes((all) => (e.target.checked ? [...all, c.code] : all.filter((x) => x !== c.code)))}
                  />
                  {c.code} {c.name ?? ''}
                </label>
              ))}
            </div>
            {errors.has('classifierCodes') ? <p className="field-error">{errors.get('classifierCodes')}</p> : null}
          </fieldset>
        </section>

        <section className="space-y-4" aria-labelledby={`${id}-cases`}>
          <h2 id={`${id}-cases`}>Cases</h2>
          {cases.map((c, i) => (
            <fieldset key={i} className="card space-y-3">
              <legend className="px-1 font-semibold">Case {i + 1}</legend>
              <div className="field">
                <label htmlFor={`${id}-d${i}`}>Description</label>
                <textarea
                  id={`${id}-d${i}`}
                  className="input"
                  rows={3}
                  value={c.description}
                  onChange={(e) => setCase(i, { description: e.target.value })}
                  aria-invalid={errors.has(`cases.${i}.description`) ? 'true' : undefined}
                />
                {errors.has(`cases.${i}.description`) ? <p className="field-error">{errors.get(`cases.${i}.description`)}</p> : null}
              </div>
              <div className="grid gap-4 sm:grid-cols-[1fr_auto]">
                <div className="field">
                  <label htmlFor={`${id}-v${i}`}>Video link (optional; only the address is kept)</label>
                  <input
                    id={`${id}-v${i}`}
                    type="url"
                    className="input"
                    placeholder="https://"
                    value={c.videoUrl}
                    onChange={(e) => setCase(i, { videoUrl: e.target.value })}
                    aria-invalid={errors.has(`cases.${i}.videoUrl`) ? 'true' : undefined}
                  />
                  {errors.has(`cases.${i}.videoUrl`) ? <p className="field-error">The link {errors.get(`cases.${i}.videoUrl`)}</p> : null}
                </div>
                <div className="field">
                  <label htmlFor={`${id}-r${i}`}>Reference class</label>
                  <select
                    id={`${id}-r${i}`}
                    className="input"
                    value={c.referenceClass}
                    onChange={(e) => setCase(i, { referenceClass: Number(e.target.value) })}
                  >
                    {scaleClasses(scale).map((h) => (
                      <option key={h} value={h}>
                        {formatClass(h)}
                      </option>
                    ))}
                  </select>
                </div>
              </div>
              <fieldset>
                <legend className="text-sm font-semibold">Skills to watch</legend>
                <div className="grid grid-cols-2 gap-1 lg:grid-cols-4">
                  {SKILLS.map((s) => (
                    <label key={s} className="flex min-h-9 items-center gap-2 text-sm">
                      <input
                        type="checkbox"
                        checked={c.skills.includes(s)}
                        onChange={(e) =>
                          setCase(i, {
                            skills: e.target.checked
                              ? SKILLS.filter((x) => x === s || c.skills.includes(x))
                              : c.skills.filter((x) => x !== s),
                          })
                        }
                      />
                      {SKILL_LABELS[s]}
                    </label>
                  ))}
                </div>
                {errors.has(`cases.${i}.skills`) ? <p className="field-error">{errors.get(`cases.${i}.skills`)}</p> : null}
              </fieldset>
              {cases.length > 1 ? (
                <button
                  type="button"
                  className="btn btn-quiet min-h-9 px-3 py-1 text-sm"
                  onClick={() => setCases((all) => all.filter((_, j) => j !== i))}
                >
                  Remove case {i + 1}
                </button>
              ) : null}
            </fieldset>
          ))}
          <button type="button" className="btn btn-quiet" onClick={() => setCases((all) => [...all, emptyCase()])}>
            Add a case
          </button>
        </section>

        {create.isError ? <ErrorNotice error={create.error} /> : null}
        <button type="submit" className="btn btn-primary" disabled={create.isPending}>
          {create.isPending ? 'Saving…' : 'Save draft'}
        </button>
      </form>
    </div>
  );
}
