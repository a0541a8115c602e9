import { ApiError } from '../lib/api-client';

export function Loading({ label = 'Loading…' }: { label?: string }) {
  return (
    <p role="status" className="py-8 text-muted">
      {label}
    </p>
  );
}

export function ErrorNotice({ error }: { error: unknown }) {
  const message = error instanceof ApiError ? error.message : 'Something went wrong. Try again in a moment.';
  return (
    <p role="alert" className="rounded-lg bg-alert-soft px-4 py-3 text-alert">
      {message}
    </p>
  );
}
