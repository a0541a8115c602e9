import { Link } from 'react-router';
import { EXERCISE_STATUS_LABELS, type ExerciseSummary } from '../../../../shared/schemas/exercises';
import { useCurrentFederation } from '../../../lib/use-federation';
import { DataTable } from '../../../components/data-table';
import { ErrorNotice, Loading } from '../../../components/status';
import { useExercises } from '../api/get-exercises';

/** The caller's calibration exercises: every one for a lead, those assigned for a classifier. */
export function ExercisesPage() {
  const { federation, role } = useCurrentFederation();
  const exercises = useExercises(federation.slug);
  const lead = role === 'lead';
  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end gap-3">
        <div className="mr-auto max-w-3xl space-y-1">
          <h1>Calibration exercises</h1>
          <p className="text-muted">
            {lead
              ? 'Practice cases with a reference class agreed by a senior panel, answered blind by the classifiers you assign. Start one from a calibration flag or a class boundary.'
              : 'Practice cases assigned to you. Answer each with the class you would give; you see the reference classes and your scores once the exercise closes.'}
          </p>
        </div>
        {lead ? (
          <Link to="new" className="btn btn-primary">
            New exercise
          </Link>
        ) : null}
      </div>
      {exercises.isPending ? (
        <Loading />
      ) : exercises.isError ? (
        <ErrorNotice error={exercises.error} />
      ) : (
        <ExerciseTable rows={exercises.data.exercises} lead={lead} federation={federation.slug} />
      )}
    </div>
  );
}

function ExerciseTable({ rows, lead, federation }: { rows: ExerciseSummary[]; lead: boolean; federation: string }) {
  return (
    <DataTable
      caption="Exercises"
      rowKey={(r) => String(r.id)}
      emptyText={lead ? 'No exercise yet.' : 'No exercise is assigned to you.'}
      csvFileName={`${federation}-exercises.csv`}
      columns={[
        {
          key: 'title',
          header: 'Exercise',
          cell: (r) => (
            <Link to={String(r.id)} className="font-semibold text-harbour underline">
              {r.title}
            </Link>
          ),
        },
        { key: 'status', header: 'Status', cell: (r) => <StatusBadge status={r.exercise.status} /> },
        { key: 'dates', header: 'Open – close' },
        { key: 'cases', header: 'Cases', align: 'right' },
        { key: 'progress', header: lead ? 'Finished' : 'Answered', align: 'right' },
      ]}
      rows={rows.map((e) => ({
        id: e.id,
        title: e.title,
        status: EXERCISE_STATUS_LABELS[e.status],
        dates: `${e.opensOn} – ${e.closesOn}`,
        cases: e.cases,
        progress: lead ? `${e.finished} of ${e.assigned}` : `${e.mine?.answered ?? 0} of ${e.cases}`,
        exercise: e,
      }))}
    />
  );
}

export function StatusBadge({ status }: { status: ExerciseSummary['status'] }) {
  const tone = status === 'open' ? 'bg-amber-soft' : status === 'draft' ? 'bg-harbour-soft' : 'bg-ok-soft';
  return (
    <span className={`inline-block rounded-full px-2 py-0.5 text-xs font-semibold text-ink ${tone}`}>{EXERCISE_STATUS_LABELS[status]}</span>
  );
}
