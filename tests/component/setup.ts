import '@testing-library/jest-dom/vitest';
import { cleanup } from '@testing-library/react';
import { afterEach, beforeEach, vi } from 'vitest';

/**
 * A component test fails when the code under test writes to console.error (React's warnings,
 * a failed render, an unhandled query error), unless the test expects it: call
 * `expectConsoleError(/pattern/)` before the render that should log it.
 */
const allowed: RegExp[] = [];
let unexpected: string[] = [];

export function expectConsoleError(pattern: RegExp): void {
  allowed.push(pattern);
}

beforeEach(() => {
  unexpected = [];
  vi.spyOn(console, 'error').mockImplementation((...args: unknown[]) => {
    const text = args.map((a) => (a instanceof Error ? a.message : String(a))).join(' ');
    if (!allowed.some((p) => p.test(text))) unexpected.push(text);
  });
});

afterEach(() => {
  cleanup();
  vi.mocked(console.error).mockRestore();
  allowed.length = 0;
  const found = unexpected;
  unexpected = [];
  if (found.length) throw new Error(`Unexpected console.error in this test:\n${found.join('\n')}`);
});
