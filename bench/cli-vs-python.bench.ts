/**
 * The command line against the analyst's usual pipeline, whole process, on the same file:
 * `panelwise analyze FILE.csv` (bin/panelwise.js) and ../shared/bench/py_reference_pipeline.py
 * (pandas, numpy, statsmodels and scikit-learn, run with Debian's system python3) on a 1,000,000
 * rating tidy CSV made once by ../shared/bench/make_big.py. They run in turn (A B A B …,
 * BENCH_RUNS pairs, default 3) so both see the same load; each run's wall time and peak memory
 * (maximum resident set) come from GNU time (/usr/bin/time), or from this process's clock when
 * GNU time is absent (then without peak memory).
 *
 *   npm run bench -- cli-vs-python
 *
 * Prints the median wall time and peak memory of each, and the median of the per-pair ratios
 * CLI / pipeline (goal: wall ≤ 0.5, peak memory ≤ 1). Without python3-pandas it says so, makes the
 * file with the project's own generator (tests/factories/import-csv.ts) and measures the CLI alone.
 * Writes bench/out/cli-vs-python.json.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { writeLongCsv } from '../tests/factories/import-csv';

const RATINGS = 1_000_000;
const RUNS = Math.max(1, Number(process.env.BENCH_RUNS ?? 3));
const root = fileURLToPath(new URL('../', import.meta.url));
const shared = path.join(root, '../shared/bench');
const python = '/usr/bin/python3';
const gnuTime = '/usr/bin/time';
const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'panelwise-cli-bench-'));
const csv = path.join(dir, 'big.csv');

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

const hasPython =
  fs.existsSync(path.join(shared, 'py_reference_pipeline.py')) &&
  spawnSync(python, ['-c', 'import numpy, pandas, statsmodels, sklearn'], { stdio: 'ignore' }).status === 0;
const hasTime = spawnSync(gnuTime, ['-f', '%M', 'true'], { stdio: 'ignore' }).status === 0;

interface Run {
  wallS: number;
  peakMiB: number | null;
}

/** One whole-process run; stdout goes to a file (so a pipe's speed is not measured), and is returned. */
function measure(command: string[], out: string): Run {
  const outFd = fs.openSync(out, 'w');
  const stats = path.join(dir, 'time.txt');
  const argv = hasTime ? [gnuTime, '-o', stats, '-f', '%e %M', ...command] : command;
  const t0 = performance.now();
  const r = spawnSync(argv[0], argv.slice(1), { stdio: ['ignore', outFd, 'pipe'], cwd: root, maxBuffer: 1 << 26 });
  const wall = (performance.now() - t0) / 1000;
  fs.closeSync(outFd);
  if (r.status !== 0) throw new Error(`${command.join(' ')} failed (${r.status}): ${String(r.stderr).slice(0, 2000)}`);
  if (!hasTime) return { wallS: wall, peakMiB: null };
  const [elapsed, kb] = fs.readFileSync(stats, 'utf8').trim().split(/\s+/).slice(-2).map(Number);
  return { wallS: elapsed, peakMiB: kb / 1024 };
}

const g0 = performance.now();
if (hasPython) {
  const made = spawnSync(python, [path.join(shared, 'make_big.py'), String(RATINGS), csv], { stdio: ['ignore', 'ignore', 'pipe'] });
  if (made.status !== 0) throw new Error(`make_big.py failed: ${String(made.stderr)}`);
} else {
  console.log('Debian python3-pandas (with numpy, statsmodels, scikit-learn) is not installed: measuring the command line alone.');
  console.log('  (apt-get install -y python3-numpy python3-pandas python3-sklearn python3-statsmodels time)');
  await writeLongCsv(csv, { ratings: RATINGS, prefix: 'BENCH-', compact: true });
}
const generateS = (performance.now() - g0) / 1000;
const fileBytes = fs.statSync(csv).size;
if (!hasTime) console.log('GNU time (/usr/bin/time) is not installed: wall times from this process, no peak memory.');

// Build the command line's bundle before measuring (the first run after a change builds it).
const cli = [process.execPath, path.join(root, 'bin/panelwise.js'), 'analyze'];
spawnSync(cli[0], [...cli.slice(1), path.join(root, 'fixtures/analysis/small-long.csv')], { stdio: 'ignore', cwd: root });
const pipeline = [python, path.join(shared, 'py_reference_pipeline.py')];

const cliRuns: Run[] = [];
const pyRuns: Run[] = [];
const ratios: number[] = [];
for (let i = 0; i < RUNS; i++) {
  const a = measure([...cli, csv], path.join(dir, 'cli.json'));
  const report = JSON.parse(fs.readFileSync(path.join(dir, 'cli.json'), 'utf8')) as { counts: { ratings: number } };
  if (report.counts.ratings !== RATINGS) throw new Error(`the command line counted ${report.counts.ratings} ratings, not ${RATINGS}`);
  cliRuns.push(a);
  let line = `run ${i + 1}: panelwise analyze ${a.wallS.toFixed(2)} s${a.peakMiB === null ? '' : `, ${a.peakMiB.toFixed(0)} MiB`}`;
  if (hasPython) {
    const b = measure([...pipeline, csv], path.join(dir, 'py.out'));
    pyRuns.push(b);
    ratios.push(a.wallS / b.wallS);
    line += `; pipeline ${b.wallS.toFixed(2)} s${b.peakMiB === null ? '' : `, ${b.peakMiB.toFixed(0)} MiB`}; ratio ${(a.wallS / b.wallS).toFixed(2)}`;
  }
  console.log(line);
}
fs.rmSync(dir, { recursive: true, force: true });

const med = (runs: Run[], key: keyof Run) =>
  runs.length === 0 || runs[0][key] === null ? null : median(runs.map((r) => r[key] as number));
const out = {
  benchmark: 'cli-vs-python',
  ratings: RATINGS,
  fileBytes,
  generator: hasPython ? '../shared/bench/make_big.py' : 'tests/factories/import-csv.ts',
  generateS,
  runs: RUNS,
  node: process.version,
  cli: { medianWallS: med(cliRuns, 'wallS'), medianPeakMiB: med(cliRuns, 'peakMiB'), runs: cliRuns },
  pipeline: hasPython ? { medianWallS: med(pyRuns, 'wallS'), medianPeakMiB: med(pyRuns, 'peakMiB'), runs: pyRuns } : null,
  medianWallRatio: hasPython ? median(ratios) : null,
  peakMemoryRatio: hasPython && hasTime ? med(cliRuns, 'peakMiB')! / med(pyRuns, 'peakMiB')! : null,
  goals: { wallRatio: 0.5, peakMemoryRatio: 1 },
};
const mib = (x: number | null) => (x === null ? 'n/a' : `${x.toFixed(0)} MiB`);
console.log(
  `cli-vs-python: ${RATINGS} ratings, ${(fileBytes / 1e6).toFixed(1)} MB; median of ${RUNS}: panelwise analyze ${out.cli.medianWallS!.toFixed(2)} s, peak ${mib(out.cli.medianPeakMiB)}` +
    (out.pipeline
      ? `; pipeline ${out.pipeline.medianWallS!.toFixed(2)} s, peak ${mib(out.pipeline.medianPeakMiB)}; median wall ratio ${out.medianWallRatio!.toFixed(2)} (goal ≤ 0.5)` +
        (out.peakMemoryRatio === null ? '' : `, peak memory ratio ${out.peakMemoryRatio.toFixed(2)} (goal ≤ 1)`)
      : ' (no pipeline to compare with)'),
);
const outDir = path.join(root, 'bench/out');
fs.mkdirSync(outDir, { recursive: true });
fs.writeFileSync(path.join(outDir, 'cli-vs-python.json'), JSON.stringify(out, null, 2) + '\n');
