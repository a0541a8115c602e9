import { useId, useState } from 'react';
import {
  SKILL_LABELS,
  type ExerciseDetail,
  type ExerciseResults,
  type PanelWindow,
  type Skill,
} from '../../../../shared/schemas/exercises';
import { formatClass } from '../../../../shared/scale';
import { Caution } from '../../../components/caution';
import { DataTable } from '../../../components/data-table';
import { ErrorNotice } from '../../../components/status';
import { useFlags } from '../../dashboards/api/get-flags';
import { num, pct, signed, withInterval } from '../../../lib/stat-format';
import { useCloseFlagWithExercise } from '../api/close-flag';
import { BeforeAfterChart } from './before-after-chart';

const skillList = (side: { skills: { skill: Skill; n: number }[] } | null) =>
  side && side.skills.length ? side.skills.map((s) => `${SKILL_LABELS[s.skill]} ${s.n}`).join(', ') : '—';

/** The scores of a closed exercise: per classifier, per case, and (leads) the live-panel figures before and after. */
export function ExerciseResultsSection({
  federation,
  exercise,
  results,
  lead,
}: {
  federation: string;
  exercise: ExerciseDetail;
  results: ExerciseResults;
  lead: boolean;
}) {
  return (
    <section className="space-y-6" aria-labelledby="results-title">
      <h2 id="results-title">Results</h2>
      <Caution />
      <p className="max-w-3xl text-sm text-muted">
        Scores compare each answer with the reference class the senior panel agreed for these cases. With few cases the intervals are wide:
        read them as a prompt for discussion, not a measurement of anyone’s skill. Bias and points are in sport-class points (one class step
        = 0.5 point).
      </p>
      <DataTable
        caption={lead ? 'Scores per classifier' : 'Your scores'}
        rowKey={(r) => r.code}
        csvFileName={`${federation}-exercise-${exercise.id}-scores.csv`}
        columns={[
          { key: 'code', header: 'Classifier' },
          { key: 'answered', header: 'Cases answered', align: 'right' },
          { key: 'exact', header: 'Exact with reference' },
          { key: 'withinHalf', header: 'Within half a point' },
          { key: 'kappa', header: 'Quadratic kappa' },
          { key: 'bias', header: 'Bias (points)' },
          { key: 'stake', header: 'Points at stake' },
        ]}
        rows={results.classifiers.map((c) => ({
          code: `${c.classifierCode} ${c.classifierName}`,
          answered: c.answered,
          exact: pct(c.exact.value),
          withinHalf: pct(c.withinHalf.value),
          kappa: withInterval(c.quadraticKappa),
          bias: signed(c.bias.value),
          stake: `mean ${num(c.meanAbsolutePoints)} · off ≥ 0.5: ${pct(c.offByHalfPoint.value)} · off ≥ 1: ${pct(c.offByOnePoint.value)}`,
        }))}
      />
      {results.cases.length > 0 ? (
        <DataTable
          caption="Answers per case (where the group splits, the skills each side ticked: criteria that may need clarifying)"
          rowKey={(r) => String(r.position)}
          csvFileName={`${federation}-exercise-${exercise.id}-cases.csv`}
          columns={[
            { key: 'position', header: 'Case', align: 'right' },
            { key: 'reference', header: 'Reference' },
            { key: 'answers', header: 'Answers' },
            { key: 'exact', header: 'At reference' },
            { key: 'split', header: 'Split at' },
            { key: 'lower', header: 'Lower side ticked' },
            { key: 'upper', header: 'Upper side ticked' },
          ]}
          rows={results.cases.map((c) => ({
            position: c.position,
            reference: formatClass(c.referenceClass),
            answers: c.counts.map((x) => `${formatClass(x.sportClass)} ×${x.n}`).join(' · ') || '—',
            exact: pct(c.exactShare),
            split: c.boundary === null ? 'no split' : `${formatClass(c.boundary)}/${formatClass(c.boundary + 1)}`,
            lower: c.lower ? `${c.lower.answers}: ${skillList(c.lower)}` : '—',
            upper: c.upper ? `${c.upper.answers}: ${skillList(c.upper)}` : '—',
          }))}
        />
      ) : !lead ? (
        <p className="text-sm text-muted">The spread of the group’s answers is shown when at least three classifiers took part.</p>
      ) : null}
      {lead ? <BeforeAfterSection results={results} /> : null}
      {lead ? <FlagLinks federation={federation} exercise={exercise} /> : null}
    </section>
  );
}

function windowText(w: PanelWindow): string {
  if (w.n === 0) return w.exactWithPanel.reason ?? 'no ratings';
  return `${w.n} ratings, ${w.from} to ${w.to}`;
}

function BeforeAfterSection({ results }: { results: ExerciseResults }) {
  if (results.beforeAfter.length === 0) {
    return (
      <p className="text-sm text-muted">
        No classifier assigned had an open calibration flag when the exercise opened, so there is no before/after comparison.
      </p>
    );
  }
  return (
    <div className="space-y-4">
      <h3>Live panels before and after, for classifiers who had an open flag</h3>
      <p className="max-w-3xl text-sm text-muted">
        Agreement with the rest of the panel in real assessments: the last {results.window} panel ratings before the exercise opened against
        the first {results.window} after it closed. Panels, athletes and events differ between the two windows, so a change describes what
        happened; it does not show that the practice caused it.
      </p>
      {results.beforeAfter.map((b) => (
        <div key={b.classifierCode} className="space-y-3">
          <DataTable
            caption={`${b.classifierCode} ${b.classifierName}: before and after`}
            rowKey={(r) => r.figure}
            columns={[
              { key: 'figure', header: 'Figure' },
              { key: 'before', header: 'Before' },
              { key: 'after', header: 'After' },
            ]}
            rows={[
              { figure: 'Ratings', before: windowText(b.before), after: windowText(b.after) },
              {
                figure: 'Exact with the panel',
                before: withInterval(b.before.exactWithPanel),
                after: withInterval(b.after.exactWithPanel),
              },
              {
                figure: 'Within half a point',
                before: withInterval(b.before.withinHalfWithPanel),
                after: withInterval(b.after.withinHalfWithPanel),
              },
              {
                figure: 'Quadratic kappa with the panel',
                before: withInterval(b.before.quadraticKappaWithPanel),
                after: withInterval(b.after.quadraticKappaWithPanel),
              },
              {
                figure: 'Mean deviation (points)',
                before: withInterval(b.before.meanDeviation),
                after: withInterval(b.after.meanDeviation),
              },
            ]}
          />
          <BeforeAfterChart item={b} />
        </div>
      ))}
    </div>
  );
}

function FlagLinks({ federation, exercise }: { federation: string; exercise: ExerciseDetail }) {
  const flags = useFlags(federation);
  const close = useCloseFlagWithExercise(federation, exercise.id);
  const [note, setNote] = useState('');
  const [flagId, setFlagId] = useState<number | ''>('');
  const id = useId();
  const codes = new Set((exercise.assignments ?? []).map((a) => a.classifierCode));
  const candidates = (flags.data?.flags ?? []).filter((f) => f.status !== 'closed' && codes.has(f.classifierCode));
  return (
    <div className="card space-y-3">
      <h3>Flags answered by this exercise</h3>
      {exercise.linkedFlags.length > 0 ? (
        <ul className="list-disc pl-5 text-sm">
          {exercise.linkedFlags.map((f) => (
            <li key={f.id}>
              Flag #{f.id} of {f.classifierCode} ({f.rule}) closed with a link to this exercise
            </li>
          ))}
        </ul>
      ) : null}
      {candidates.length === 0 ? (
        <p className="text-sm text-muted">No open flag of a classifier assigned.</p>
      ) : (
        <form
          className="space-y-2"
          onSubmit={(e) => {
            e.preventDefault();
            if (flagId === '') return;
            close.mutate({ flagId, note: note.trim() }, { onSuccess: () => setNote('') });
          }}
        >
          <div className="grid gap-3 sm:grid-cols-2">
            <div className="field">
              <label htmlFor={`${id}-flag`}>Flag to close</label>
              <select
                id={`${id}-flag`}
                className="input"
                value={flagId}
                onChange={(e) => setFlagId(e.target.value === '' ? '' : Number(e.target.value))}
              >
                <option value="">Choose…</option>
                {candidates.map((f) => (
                  <option key={f.id} value={f.id}>
                    #{f.id} {f.classifierCode} — {f.rule}
                  </option>
                ))}
              </select>
            </div>
            <div className="field">
              <label htmlFor={`${id}-note`}>Note (what the exercise showed)</label>
              <input id={`${id}-note`} className="input" value={note} onChange={(e) => setNote(e.target.value)} />
            </div>
          </div>
          <button type="submit" className="btn btn-quiet" disabled={close.isPending || flagId === '' || note.trim() === ''}>
            Close the flag with a link to this exercise
          </button>
          {close.isError ? <ErrorNotice error={close.error} /> : null}
        </form>
      )}
    </div>
  );
}
