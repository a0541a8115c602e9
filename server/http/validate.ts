import type { ZodType } from 'zod';
import { HttpError, zodDetails } from './errors';

/** Parses a request part with a shared zod schema; a failure is a 400 naming each field. */
export function parseWith<T>(schema: ZodType<T>, value: unknown, what = 'request body'): T {
  const result = schema.safeParse(value);
  if (!result.success) throw new HttpError(400, 'validation_failed', `The ${what} is not valid`, zodDetails(result.error));
  return result.data;
}
