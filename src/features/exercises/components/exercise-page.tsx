import { useId, useState } from 'react';
import { Link, useParams } from 'react-router';
import {
  SKILL_LABELS,
  SKILLS,
  type AnswerView,
  type ExerciseCaseView,
  type ExerciseDetail,
  type Skill,
} from '../../../../shared/schemas/exercises';
import { formatClass, scaleClasses } from '../../../../shared/scale';
import { usePageTitle } from '../../../lib/page-title';
import { useCurrentFederation } from '../../../lib/use-federation';
import { Caution } from '../../../components/caution';
import { DataTable } from '../../../components/data-table';
import { ErrorNotice, Loading } from '../../../components/status';
import { useChangeExerciseStatus } from '../api/change-status';
import { useExercise } from '../api/get-exercise';
import { useSaveAnswer } from '../api/save-answer';
import { StatusBadge } from './exercises-page';
import { ExerciseResultsSection } from './exercise-results';

/** One exercise: the lead's view (progress, open and close, results) or the classifier's (answering, then own scores). */
export function ExercisePage() {
  const { federation, role } = useCurrentFederation();
  const id = Number(useParams().id);
  const exercise = useExercise(federation.slug, id);
  usePageTitle(exercise.data ? `Exercise: ${exercise.data.title}` : `Exercise ${id}`);
  if (exercise.isPending) return <Loading />;
  if (exercise.isError) return <ErrorNotice error={exercise.error} />;
  const e = exercise.data;
  return (
    <div className="space-y-6">
      <div className="space-y-2">
        <p>
          <Link to=".." relative="path" className="text-sm text-harbour underline">
            ← Exercises
          </Link>
        </p>
        <div className="flex flex-wrap items-center gap-3">
          <h1 className="mr-2">{e.title}</h1>
          <StatusBadge status={e.status} />
        </div>
        <p className="text-muted">
          {e.cases} case{e.cases === 1 ? '' : 's'} · opens {e.opensOn} · closes at the end of {e.closesOn} (UTC)
          {e.source
            ? ` · started from ${e.source.kind === 'flag' ? `flag #${e.source.ref}` : `the ${formatClass(Number(e.source.ref))}/${formatClass(Number(e.source.ref) + 1)} boundary`}`
            : ''}
        </p>
      </div>
      {role === 'lead' ? (
        <LeadView federation={federation.slug} exercise={e} />
      ) : (
        <ClassifierView federation={federation.slug} exercise={e} />
      )}
    </div>
  );
}

function LeadView({ federation, exercise: e }: { federation: string; exercise: ExerciseDetail }) {
  const change = useChangeExerciseStatus(federation, e.id);
  const [confirming, setConfirming] = useState(false);
  const assignments = e.assignments ?? [];
  return (
    <>
      <section className="card space-y-3" aria-labelledby="progress-title">
        <div className="flex flex-wrap items-center gap-3">
          <h2 id="progress-title" className="mr-auto">
            Classifiers ({e.finished} of {e.assigned} finished)
          </h2>
          {e.status === 'draft' ? (
            <button type="button" className="btn btn-primary" disabled={change.isPending} onClick={() => change.mutate('open')}>
              Open and send invitations
            </button>
          ) : null}
          {e.status === 'open' && !confirming ? (
            <button type="button" className="btn btn-quiet" onClick={() => setConfirming(true)}>
              Close now…
            </button>
          ) : null}
        </div>
        {confirming && e.status === 'open' ? (
          <div role="group" aria-label="Confirm closing" className="flex flex-wrap items-center gap-3 rounded-lg bg-amber-soft p-3">
            <p className="mr-auto text-sm">
              Closing freezes every answer, shows the reference classes to the classifiers and sends them the results notice.
            </p>
            <button
              type="button"
              className="btn btn-primary"
              disabled={change.isPending}
              onClick={() => change.mutate('close', { onSettled: () => setConfirming(false) })}
            >
              Close and score
            </button>
            <button type="button" className="btn btn-quiet" onClick={() => setConfirming(false)}>
              Keep open
            </button>
          </div>
        ) : null}
        {change.isError ? <ErrorNotice error={change.error} /> : null}
        <DataTable
          caption="Classifiers assigned"
          rowKey={(r) => r.code}
          columns={[
            { key: 'code', header: 'Classifier' },
            { key: 'answered', header: 'Answered', align: 'right' },
            { key: 'finished', header: 'Finished' },
            { key: 'flag', header: 'Open flag when opened' },
            { key: 'mail', header: 'E-mail' },
          ]}
          rows={assignments.map((a) => ({
            code: `${a.classifierCode} ${a.classifierName}`,
            answered: `${a.answered} of ${e.cases}`,
            finished: a.finishedAt ? a.finishedAt.slice(0, 10) : 'not yet',
            flag: a.hadOpenFlag ? 'yes' : '—',
            mail: !a.hasAccount
              ? 'no account: cannot answer online'
              : [a.invitedAt ? `invited ${a.invitedAt.slice(0, 10)}` : null, a.remindedAt ? `reminded ${a.remindedAt.slice(0, 10)}` : null]
                  .filter(Boolean)
                  .join(', ') || '—',
          }))}
        />
      </section>
      {e.results ? <ExerciseResultsSection federation={federation} exercise={e} results={e.results} lead /> : null}
      <CasesList cases={e.caseList} answers={null} />
    </>
  );
}

function CasesList({ cases, answers }: { cases: ExerciseCaseView[]; answers: AnswerView[] | null }) {
  return (
    <section className="space-y-3" aria-labelledby="cases-title">
      <h2 id="cases-title">Cases</h2>
      <ol className="space-y-3">
        {cases.map((c) => {
          const mine = answers?.find((a) => a.caseId === c.id);
          return (
            <li key={c.id} className="card space-y-2">
              <h3>Case {c.position}</h3>
              <CaseBody c={c} />
              <p className="text-sm">
                {c.referenceClass !== undefined ? <strong>Reference class {formatClass(c.referenceClass)}</strong> : null}
                {mine ? ` · your answer ${formatClass(mine.sportClass)}` : ''}
              </p>
            </li>
          );
        })}
      </ol>
    </section>
  );
}

function CaseBody({ c }: { c: ExerciseCaseView }) {
  return (
    <>
      <p className="max-w-3xl whitespace-pre-line">{c.description}</p>
      {c.videoUrl ? (
        <p className="text-sm">
          <a href={c.videoUrl} target="_blank" rel="noopener noreferrer" className="text-harbour underline">
            Watch the video
          </a>{' '}
          <span className="text-muted">(opens the link in a new tab)</span>
        </p>
      ) : null}
      <p className="text-sm text-muted">Skills to watch: {c.skills.map((s) => SKILL_LABELS[s]).join(', ')}</p>
    </>
  );
}

function ClassifierView({ federation, exercise: e }: { federation: string; exercise: ExerciseDetail }) {
  if (e.status === 'closed') {
    return (
      <>
        {e.results ? <ExerciseResultsSection federation={federation} exercise={e} results={e.results} lead={false} /> : null}
        <CasesList cases={e.caseList} answers={e.myAnswers} />
      </>
    );
  }
  const answered = e.mine?.answered ?? 0;
  return (
    <>
      <p role="status" className="card" data-testid="my-progress">
        {answered === e.cases
          ? `All ${e.cases} cases answered. You can still change an answer until the close.`
          : `${answered} of ${e.cases} cases answered. Each answer is saved when you press Save.`}
      </p>
      <p className="text-sm text-muted">
        Blind practice: no one sees the reference classes before the close, and no other classifier sees your answers.
      </p>
      <ol className="space-y-4">
        {e.caseList.map((c) => (
          <li key={c.id}>
            <AnswerForm
              federation={federation}
              exerciseId={e.id}
              theCase={c}
              saved={e.myAnswers?.find((a) => a.caseId === c.id) ?? null}
              scale={e.scale}
            />
          </li>
        ))}
      </ol>
      <Caution />
    </>
  );
}

function AnswerForm({
  federation,
  exerciseId,
  theCase: c,
  saved,
  scale,
}: {
  federation: string;
  exerciseId: number;
  theCase: ExerciseCaseView;
  saved: AnswerView | null;
  scale: { min: number; max: number };
}) {
  const save = useSaveAnswer(federation, exerciseId);
  const [sportClass, setSportClass] = useState<number | ''>(saved?.sportClass ?? '');
  const [skills, setSkills] = useState<Skill[]>(saved?.skills ?? []);
  const [reason, setReason] = useState(saved?.reason ?? '');
  const [problem, setProblem] = useState<string | null>(null);
  const id = useId();
  return (
    <form
      className="card space-y-3"
      aria-labelledby={`${id}-title`}
      onSubmit={(ev) => {
        ev.preventDefault();
        if (sportClass === '') {
          setProblem('Choose a class first.');
          return;
        }
        setProblem(null);
        save.mutate({ caseId: c.id, answer: { sportClass, skills, reason: reason.trim() || undefined } });
      }}
    >
      <h3 id={`${id}-title`}>Case {c.position}</h3>
      <CaseBody c={c} />
      <div className="field max-w-xs">
        <label htmlFor={`${id}-class`}>Your class for case {c.position}</label>
        <select
          id={`${id}-class`}
          className="input"
          value={sportClass}
          onChange={(ev) => setSportClass(ev.target.value === '' ? '' : Number(ev.target.value))}
          aria-invalid={problem ? 'true' : undefined}
        >
          <option value="">Choose…</option>
          {scaleClasses(scale).map((h) => (
            <option key={h} value={h}>
              {formatClass(h)}
            </option>
          ))}
        </select>
        {problem ? (
          <p role="alert" className="field-error">
            {problem}
          </p>
        ) : null}
      </div>
      <fieldset>
        <legend className="text-sm font-semibold">Skills that decided it</legend>
        <div className="grid grid-cols-2 gap-1 lg:grid-cols-4">
          {SKILLS.map((s) => (
            <label key={s} className="flex min-h-9 items-center gap-2 text-sm">
              <input
                type="checkbox"
                checked={skills.includes(s)}
                onChange={(ev) =>
                  setSkills((all) => (ev.target.checked ? SKILLS.filter((x) => x === s || all.includes(x)) : all.filter((x) => x !== s)))
                }
              />
              {SKILL_LABELS[s]}
            </label>
          ))}
        </div>
      </fieldset>
      <div className="field">
        <label htmlFor={`${id}-reason`}>Short reason (optional)</label>
        <input id={`${id}-reason`} className="input" maxLength={500} value={reason} onChange={(ev) => setReason(ev.target.value)} />
      </div>
      <div className="flex flex-wrap items-center gap-3">
        <button type="submit" className="btn btn-primary" disabled={save.isPending}>
          Save case {c.position}
        </button>
        {save.isSuccess && !save.isPending ? (
          <span role="status" className="text-sm text-ok">
            Saved {new Date(save.data.answer.updatedAt).toLocaleTimeString('en-GB')}
          </span>
        ) : saved ? (
          <span className="text-sm text-muted">Saved answer: {formatClass(saved.sportClass)}</span>
        ) : null}
      </div>
      {save.isError ? <ErrorNotice error={save.error} /> : null}
    </form>
  );
}
