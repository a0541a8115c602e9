/**
 * The role × route matrix: every API route registered on the Express router must have an entry
 * in one of the files of this folder (one file per feature, exporting `entries`), saying what
 * each kind of caller gets. The matrix test walks the router itself, so a route without an entry
 * fails the tests.
 */

/**
 * - anonymous: no session, no token
 * - lead, classifier, researcher: the demo accounts of the demo federation (kestrel-coast)
 * - outsider: a lead of another federation only
 * - readToken, importToken: API tokens of the demo federation with that scope
 */
export type Caller = 'anonymous' | 'lead' | 'classifier' | 'researcher' | 'outsider' | 'readToken' | 'importToken';

export const CALLERS: readonly Caller[] = ['anonymous', 'lead', 'classifier', 'researcher', 'outsider', 'readToken', 'importToken'];

export type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

export interface AccessEntry {
  method: Method;
  /** The path as registered on the router, under /api (for example '/api/federations/:federation/summary'). */
  path: string;
  /**
   * Values for the path's parameters; `:federation` defaults to the demo federation's slug.
   * Use values that exist in the demo data where the allowed callers should get 2xx.
   */
  params?: Record<string, string>;
  /** A request body; for state-changing routes prefer one that is refused by validation (400) or is harmless. */
  body?: unknown;
  /** The status each caller gets. Every caller must be listed. */
  expect: Record<Caller, number>;
  /** Why the route is open or closed to whom, when it is not obvious. */
  note?: string;
}
