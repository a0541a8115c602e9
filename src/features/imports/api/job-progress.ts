import type { ImportProgress } from '../../../../shared/schemas/imports';
import { federationPath } from './keys';

/** A fresh id for a progress job. */
export function newJobId(): string {
  return `job-${Math.random().toString(36).slice(2)}${Date.now().toString(36)}`;
}

export interface ProgressStream {
  close(): void;
}

/**
 * Follows a job's progress as server-sent events. Resolves once the stream is listening (its
 * first event, or after a short wait if the stream cannot open), so the caller can then start
 * the request that the job reports on.
 */
export function followProgress(federation: string, job: string, onProgress: (p: ImportProgress) => void): Promise<ProgressStream> {
  return new Promise((resolve) => {
    if (typeof EventSource === 'undefined') return resolve({ close: () => {} });
    const source = new EventSource(`/api${federationPath(federation)}/import-jobs/${encodeURIComponent(job)}/events`, {
      withCredentials: true,
    });
    const stream = { close: () => source.close() };
    let opened = false;
    const ready = () => {
      if (opened) return;
      opened = true;
      resolve(stream);
    };
    const timer = setTimeout(ready, 1500);
    source.onmessage = (e) => {
      clearTimeout(timer);
      ready();
      const progress = JSON.parse(e.data as string) as ImportProgress;
      onProgress(progress);
      if (progress.phase === 'done' || progress.phase === 'failed') source.close();
    };
    source.onerror = () => {
      clearTimeout(timer);
      source.close();
      ready();
    };
  });
}
