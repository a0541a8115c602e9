/**
 * The exercises' clock: closes exercises whose close date has passed (sending the results
 * notices) and sends the reminders due two days before a close. `runOnce(now)` does one pass and
 * resolves when it is done; `start()` repeats it every `intervalMs`, each run awaited before the
 * next is scheduled (never overlapping, never fire-and-forget); `stop()` waits for a run in progress.
 */
import type { AppContext } from '../context';
import { closeDueExercises, sendDueReminders } from './exercises';

export interface ExerciseScheduler {
  runOnce(now: Date): Promise<{ closed: number; reminded: number }>;
  start(): void;
  stop(): Promise<void>;
}

export function createExerciseScheduler(ctx: AppContext, options: { intervalMs?: number; clock?: () => Date } = {}): ExerciseScheduler {
  const intervalMs = options.intervalMs ?? 10 * 60 * 1000;
  const clock = options.clock ?? (() => new Date());
  let timer: NodeJS.Timeout | null = null;
  let running: Promise<unknown> | null = null;
  let stopped = true;

  const runOnce = async (now: Date) => {
    // Close first: an exercise past its close gets the results notice, not a reminder.
    const { closed } = await closeDueExercises(ctx, now);
    const { sent } = await sendDueReminders(ctx, now);
    return { closed, reminded: sent };
  };

  const tick = async () => {
    timer = null;
    running = runOnce(clock()).catch((err: unknown) => ctx.logger.error({ err }, 'the exercises scheduler run failed'));
    await running;
    running = null;
    if (!stopped) timer = setTimeout(() => void tick(), intervalMs);
  };

  return {
    runOnce,
    start() {
      if (!stopped) return;
      stopped = false;
      timer = setTimeout(() => void tick(), 0);
    },
    async stop() {
      stopped = true;
      if (timer) clearTimeout(timer);
      timer = null;
      if (running) await running;
    },
  };
}
