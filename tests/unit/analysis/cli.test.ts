/**
 * The command line on an invented fixture (fixtures/analysis/small-long.csv) and on bad files.
 * Runs bin/panelwise.js in a child process, as a user would.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { analyzeRatings } from '../../../server/analysis';
import { readTidyCsv } from '../../../server/cli/read-tidy-csv';

const root = fileURLToPath(new URL('../../../', import.meta.url));
const bin = join(root, 'bin/panelwise.js');
const fixture = join(root, 'fixtures/analysis/small-long.csv');

function run(...args: string[]) {
  const r = spawnSync(process.execPath, [bin, ...args], { encoding: 'utf8', cwd: root, timeout: 60_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

const HEADER = 'assessment_id,athlete_code,event_code,assessed_on,classifier_code,sport_class,panel_class,kind';
const dir = mkdtempSync(join(tmpdir(), 'panelwise-cli-'));
function badFile(name: string, lines: string[]): string {
  const path = join(dir, name);
  writeFileSync(path, lines.join('\n') + '\n');
  return path;
}

describe('panelwise analyze', () => {
  it('prints the JSON report of a tidy CSV, the same as the engine computes', () => {
    const r = run('analyze', fixture);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const report = JSON.parse(r.stdout);
    expect(report.counts).toMatchObject({ assessments: 24, ratings: 69, classifiers: 5, notAnalysable: 1 });
    const direct = JSON.parse(JSON.stringify(analyzeRatings(readTidyCsv(fixture))));
    expect(report).toEqual(direct);
    expect(r.stdout).not.toMatch(/NaN/);
  });

  it('prints aligned text with --format table, and bootstrap intervals that repeat for a seed', () => {
    const t = run('analyze', fixture, '--format', 'table');
    expect(t.code).toBe(0);
    expect(t.stdout).toMatch(/Fleiss' kappa \(pooled-share generalisation for panels of varying size\)/);
    expect(t.stdout).toMatch(/C01\s+C02\s+6/);
    const a = run('analyze', fixture, '--bootstrap', '200', '--seed', '9');
    const b = run('analyze', fixture, '--bootstrap=200', '--seed=9');
    expect(a.code).toBe(0);
    const ja = JSON.parse(a.stdout);
    expect(ja.fleissKappa.ciMethod).toBe('bootstrap-percentile');
    expect(ja.fleissKappa.ci95).toEqual(JSON.parse(b.stdout).fleissKappa.ci95);
  });

  it('a class off the half-point scale: file, row, column and value on stderr, nothing on stdout, exit ≠ 0', () => {
    const r = run('analyze', join(root, 'fixtures/analysis/bad-class.csv'));
    expect(r.code).not.toBe(0);
    expect(r.stdout).toBe('');
    expect(r.stderr).toContain('fixtures/analysis/bad-class.csv');
    expect(r.stderr).toContain('row 3 (line 4)');
    expect(r.stderr).toContain('column sport_class');
    expect(r.stderr).toContain('"3.25"');
  });

  it.each([
    ['bad-date.csv', [HEADER, 'AS1,A001,E01,2024-13-01,C01,3.0,,first'], ['row 1 (line 2)', 'column assessed_on', '"2024-13-01"']],
    ['bad-kind.csv', [HEADER, 'AS1,A001,E01,2024-03-01,C01,3.0,,appeal'], ['row 1 (line 2)', 'column kind', '"appeal"']],
    [
      'blank-classifier.csv',
      [HEADER, 'AS1,A001,E01,2024-03-01,C01,3.0,,', 'AS1,A001,E01,2024-03-01,,3.5,,'],
      ['row 2 (line 3)', 'column classifier_code'],
    ],
    [
      'twice.csv',
      [HEADER, 'AS1,A001,E01,2024-03-01,C01,3.0,,', 'AS1,A001,E01,2024-03-01,C02,3.0,,', 'AS1,A001,E01,2024-03-01,C01,3.5,,'],
      ['row 3 (line 4)', 'column classifier_code', '"C01"', 'twice'],
    ],
    [
      'athlete.csv',
      [HEADER, 'AS1,A001,E01,2024-03-01,C01,3.0,,', '', 'AS1,A002,E01,2024-03-01,C02,3.0,,'],
      ['row 2 (line 4)', 'column athlete_code', '"A002"'],
    ],
    [
      'no-column.csv',
      ['assessment_id,athlete_code,event_code,assessed_on,classifier_code', 'AS1,A001,E01,2024-03-01,C01'],
      ['no column sport_class'],
    ],
  ])('%s is refused with a message naming where', (name, lines, expected) => {
    const path = badFile(name, lines);
    const r = run('analyze', path);
    expect(r.code).not.toBe(0);
    expect(r.stdout).toBe('');
    expect(r.stderr).toContain(path);
    for (const e of expected) expect(r.stderr).toContain(e);
  });

  it('a missing file and usage errors exit non-zero without stdout', () => {
    const missing = run('analyze', join(dir, 'nope.csv'));
    expect(missing.code).toBe(1);
    expect(missing.stdout).toBe('');
    expect(missing.stderr).toContain('nope.csv');
    const usage = run('analyze', fixture, '--format', 'xml');
    expect(usage.code).toBe(2);
    expect(usage.stdout).toBe('');
    expect(usage.stderr).toMatch(/--format must be json or table/);
  });
});
