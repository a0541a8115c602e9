/**
 * Progress of long import steps (reading a file, writing an import, reverting one), kept in
 * memory and streamed to the lead's browser as server-sent events. A job is named by the client
 * (a random id it sends with the request) and belongs to one user in one federation, so the
 * browser can listen before it starts the request.
 */
import type { Response } from 'express';
import type { ImportProgress } from '../../shared/schemas/imports';

interface Job {
  progress: ImportProgress;
  listeners: Set<Response>;
  finishedAt: number | null;
}

const jobs = new Map<string, Job>();
const KEEP_MS = 60_000;
export const JOB_ID = /^[A-Za-z0-9_-]{8,64}$/;

function keyOf(federationId: number, userId: number | null, jobId: string): string {
  return `${federationId}:${userId ?? 'token'}:${jobId}`;
}

function sweep(): void {
  const now = Date.now();
  for (const [key, job] of jobs)
    if (job.finishedAt !== null && now - job.finishedAt > KEEP_MS && job.listeners.size === 0) jobs.delete(key);
}

function jobOf(key: string): Job {
  let job = jobs.get(key);
  if (!job) {
    sweep();
    job = { progress: { phase: 'waiting', done: 0, total: 0, message: null }, listeners: new Set(), finishedAt: null };
    jobs.set(key, job);
  }
  return job;
}

function send(res: Response, progress: ImportProgress): void {
  res.write(`data: ${JSON.stringify(progress)}\n\n`);
}

/** A reporter for one job; a no-op when the request named no job. */
export function progressReporter(federationId: number, userId: number | null, jobId: string | undefined) {
  if (!jobId || !JOB_ID.test(jobId)) return { report: () => {}, finish: () => {} };
  const key = keyOf(federationId, userId, jobId);
  let lastSent = 0;
  const emit = (progress: ImportProgress, force: boolean) => {
    const job = jobOf(key);
    job.progress = progress;
    const now = Date.now();
    if (!force && now - lastSent < 100) return;
    lastSent = now;
    for (const res of job.listeners) send(res, progress);
  };
  return {
    report(phase: ImportProgress['phase'], done: number, total: number) {
      emit({ phase, done, total, message: null }, false);
    },
    finish(phase: 'done' | 'failed', message: string | null = null) {
      const job = jobOf(key);
      const progress: ImportProgress = { phase, done: job.progress.total, total: job.progress.total, message };
      emit(progress, true);
      job.finishedAt = Date.now();
      for (const res of job.listeners) res.end();
      job.listeners.clear();
    },
  };
}

/** Streams a job's progress as server-sent events until it finishes (or the client leaves). */
export function streamProgress(res: Response, federationId: number, userId: number | null, jobId: string): void {
  const job = jobOf(keyOf(federationId, userId, jobId));
  res.status(200);
  res.setHeader('content-type', 'text/event-stream; charset=utf-8');
  res.setHeader('cache-control', 'no-store');
  res.setHeader('x-accel-buffering', 'no');
  res.flushHeaders();
  res.write('retry: 2000\n\n');
  send(res, job.progress);
  if (job.finishedAt !== null) {
    res.end();
    return;
  }
  job.listeners.add(res);
  res.on('close', () => job.listeners.delete(res));
}
