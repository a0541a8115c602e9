import { ApiError } from '../lib/api-client';

export function Loading({ label = 'Loading…' }: { label?: string }) {
  return (
    <p role="status" className="py-8 text-muted">
      {label}
    </p>
  );
}

/** The words for an error: the API's own message, or what a dropped connection means. */
export function errorMessage(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  return 'Something went wrong. Try again in a moment.';
}

/** An error of an action (a form, a button): the message only; the action itself is the retry. */
export function ErrorNotice({ error }: { error: unknown }) {
  return (
    <p role="alert" className="rounded-lg bg-alert-soft px-4 py-3 text-alert">
      {errorMessage(error)}
    </p>
  );
}

/** An error of loading data, with a button that loads it again. */
export function ErrorState({
  error,
  onRetry,
  retrying = false,
  what,
}: {
  error: unknown;
  onRetry: () => void;
  retrying?: boolean;
  what?: string;
}) {
  return (
    <div role="alert" className="flex flex-wrap items-center gap-3 rounded-lg bg-alert-soft px-4 py-3 text-alert">
      <p className="mr-auto">
        {what ? <span className="font-semibold">{what} could not be loaded. </span> : null}
        {errorMessage(error)}
      </p>
      <button type="button" className="btn btn-quiet min-h-9 bg-card py-1 text-sm" onClick={onRetry} disabled={retrying}>
        {retrying ? 'Trying again…' : 'Try again'}
      </button>
    </div>
  );
}
