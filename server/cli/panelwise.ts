/**
 * Command line: panelwise analyze FILE.csv [--format json|table] [--bootstrap B] [--seed S],
 * and the operator's commands create-owner, backup, restore, disable-demo (ops-commands.ts).
 *
 * Prints the agreement report of a tidy ratings CSV (see read-tidy-csv.ts) as JSON (default)
 * or as aligned text. On bad input: a message naming the file, row, column and value on
 * stderr, nothing on stdout, exit code 1. Usage errors exit with code 2.
 */
import { pathToFileURL } from 'node:url';
import { analyzeRatings, type AgreementReport, type StatResult } from '../analysis';
import { OPS_COMMANDS, OPS_USAGE } from './ops-usage';
import { readTidyCsv, TidyCsvError } from './read-tidy-csv';

const USAGE = `usage: panelwise analyze FILE.csv [--format json|table] [--bootstrap B] [--seed S]

  FILE.csv      tidy ratings: assessment_id, athlete_code, event_code, assessed_on,
                classifier_code, sport_class [, panel_class, kind]
  --format      json (default) or table
  --bootstrap   resamples over assessments for percentile intervals (default 0 = none)
  --seed        seed of the resampling (default 1; same seed, same intervals)

${OPS_USAGE}`;

class UsageError extends Error {}

interface Args {
  file: string;
  format: 'json' | 'table';
  bootstrap: number;
  seed: number;
}

function parseArgs(argv: string[]): Args {
  const [command, ...rest] = argv;
  if (command === undefined || command === '--help' || command === '-h') throw new UsageError('');
  if (command !== 'analyze') throw new UsageError(`unknown command "${command}"`);
  let file: string | undefined;
  let format: Args['format'] = 'json';
  let bootstrap = 0;
  let seed = 1;
  for (let i = 0; i < rest.length; i++) {
    const a = rest[i];
    const [flag, inline] =
      a.startsWith('--') && a.includes('=') ? [a.slice(0, a.indexOf('=')), a.slice(a.indexOf('=') + 1)] : [a, undefined];
    const value = (): string => {
      const v = inline ?? rest[++i];
      if (v === undefined) throw new UsageError(`${flag} needs a value`);
      return v;
    };
    if (flag === '--format') {
      const v = value();
      if (v !== 'json' && v !== 'table') throw new UsageError(`--format must be json or table, not "${v}"`);
      format = v;
    } else if (flag === '--bootstrap') {
      const v = value();
      if (!/^\d+$/.test(v) || Number(v) > 1_000_000) throw new UsageError(`--bootstrap must be a whole number up to 1000000, not "${v}"`);
      bootstrap = Number(v);
    } else if (flag === '--seed') {
      const v = value();
      if (!/^-?\d+$/.test(v)) throw new UsageError(`--seed must be a whole number, not "${v}"`);
      seed = Number(v);
    } else if (flag === '--help' || flag === '-h') {
      throw new UsageError('');
    } else if (a.startsWith('-')) {
      throw new UsageError(`unknown option ${a}`);
    } else if (file === undefined) {
      file = a;
    } else {
      throw new UsageError(`unexpected argument "${a}"`);
    }
  }
  if (file === undefined) throw new UsageError('missing FILE.csv');
  return { file, format, bootstrap, seed };
}

function fmt(x: number | null | undefined, digits = 3): string {
  return x === null || x === undefined ? '—' : x.toFixed(digits);
}

function ci(r: { ci95: StatResult['ci95'] }): string {
  return r.ci95 ? `[${fmt(r.ci95[0])}, ${fmt(r.ci95[1])}]` : '';
}

function table(headers: string[], rows: string[][], alignRight: boolean[]): string {
  const widths = headers.map((h, j) => Math.max(h.length, ...rows.map((r) => r[j].length)));
  const line = (cells: string[]): string =>
    cells
      .map((c, j) => (alignRight[j] ? c.padStart(widths[j]) : c.padEnd(widths[j])))
      .join('  ')
      .trimEnd();
  return [line(headers), widths.map((w) => '-'.repeat(w)).join('  '), ...rows.map(line)].join('\n');
}

export function formatReportTable(r: AgreementReport, file: string): string {
  const out: string[] = [];
  const c = r.counts;
  out.push(`Panelwise agreement report — ${file}`);
  out.push(
    `${c.assessments} assessments, ${c.ratings} ratings, ${c.classifiers} classifiers, ${c.athletes} athletes, ${c.events} events; ` +
      `${c.analysable} with two or more ratings, ${c.notAnalysable} ${c.notAnalysable === 1 ? 'panel' : 'panels'} of one (not analysable)`,
  );
  out.push('');
  const stat = (name: string, s: StatResult & { label?: string | null; note?: string | null }, extra = ''): string[] => [
    name,
    fmt(s.value),
    s.se === null ? '—' : fmt(s.se),
    ci(s),
    String(s.n),
    s.value === null ? `undefined: ${s.reason ?? ''}` : (s.label ?? s.note ?? '') + extra,
  ];
  out.push(
    table(
      ['Statistic', 'Value', 'SE', '95% CI', 'n', 'Reading'],
      [
        stat('Exact agreement (unanimous panels)', r.exactAgreement.unanimous),
        stat('Exact agreement (pairwise mean)', r.exactAgreement.pairwiseMean),
        stat('Within one half-class (panel range ≤ 0.5)', r.withinHalfClassAgreement.unanimous),
        stat('Within one half-class (pairwise mean)', r.withinHalfClassAgreement.pairwiseMean),
        stat(r.fleissKappa.name, r.fleissKappa, r.fleissKappa.ciMethod === 'wald-null-se' ? ' (SE under κ = 0)' : ''),
        stat("Krippendorff's alpha, nominal", r.krippendorffAlpha.nominal),
        stat("Krippendorff's alpha, ordinal", r.krippendorffAlpha.ordinal),
        stat("Krippendorff's alpha, interval", r.krippendorffAlpha.interval),
        stat("Krippendorff's alpha, ratio", r.krippendorffAlpha.ratio),
        stat("Gwet's AC1", r.gwet.ac1, ' (SE advisory)'),
        stat("Gwet's AC2, linear weights", r.gwet.ac2Linear, ' (SE advisory)'),
        stat("Gwet's AC2, quadratic weights", r.gwet.ac2Quadratic, ' (SE advisory)'),
      ],
      [false, true, true, false, true, false],
    ),
  );
  out.push('');
  out.push("Fleiss' kappa by class");
  out.push(
    table(
      ['Class', 'Kappa', 'SE0', 'Share'],
      Object.entries(r.fleissKappaByClass).map(([k, s]) => [k, fmt(s.value), fmt(s.se), fmt(r.fleissKappa.shares[k] ?? null)]),
      [false, true, true, true],
    ),
  );
  out.push('');
  out.push('Pairs of classifiers (two or more shared assessments)');
  out.push(
    r.pairs.length === 0
      ? '(none)'
      : table(
          ['A', 'B', 'n', 'Exact', 'Kappa', 'Linear', 'Quadratic'],
          r.pairs.map((p) => [
            p.a,
            p.b,
            String(p.n),
            fmt(p.exact.value),
            fmt(p.kappa.value),
            fmt(p.linearKappa.value),
            fmt(p.quadraticKappa.value),
          ]),
          [false, false, true, true, true, true, true],
        ),
  );
  out.push('');
  out.push('Classifiers against the rest of the panel (deviation in points; + = rates higher)');
  out.push(
    r.classifiers.length === 0
      ? '(none)'
      : table(
          ['Classifier', 'n', 'Mean dev.', '95% CI', 'Exact', 'Within ½', 'Quadratic κ'],
          r.classifiers.map((k) => [
            k.code,
            String(k.n),
            k.meanDeviation.value === null ? '—' : (k.meanDeviation.value >= 0 ? '+' : '') + k.meanDeviation.value.toFixed(3),
            ci(k.meanDeviation),
            fmt(k.exactWithPanel.value),
            fmt(k.withinHalfWithPanel.value),
            fmt(k.quadraticKappaWithPanel.value),
          ]),
          [false, true, true, false, true, true, true],
        ),
  );
  out.push('');
  out.push(
    `Severity: ${r.severity.model}; 0 = the average classifier of the main panel network, + = rates higher for the same athlete ` +
      `(${r.severity.ciMethod} interval; decision record 0009)`,
  );
  out.push(
    r.classifiers.length === 0
      ? '(none)'
      : table(
          ['Classifier', 'n', 'Severity', '95% CI', 'Links', 'Note'],
          r.classifiers.map((k) => [
            k.code,
            String(k.severity.n),
            k.severity.value === null ? '—' : (k.severity.value >= 0 ? '+' : '') + k.severity.value.toFixed(3),
            ci(k.severity),
            String(k.severity.links),
            k.severity.reason ?? '',
          ]),
          [false, true, true, false, true, false],
        ),
  );
  out.push('');
  out.push('Class boundaries (share of panels touching either class that split across the boundary)');
  out.push(
    table(
      ['Boundary', 'Split rate', 'Splits', 'n'],
      r.boundaries.map((b) => [`${b.lower} / ${b.upper}`, fmt(b.splitRate), String(b.splits), String(b.n)]),
      [false, true, true, true],
    ),
  );
  if (r.bootstrap) {
    out.push('');
    out.push(`Intervals marked by the bootstrap: ${r.bootstrap.B} resamples of assessments, seed ${r.bootstrap.seed} (percentile).`);
  }
  out.push('');
  out.push(`Readings: ${r.interpretation.landisKoch}. ${r.interpretation.krippendorff}.`);
  return out.join('\n') + '\n';
}

export function main(argv: string[]): number {
  let args: Args;
  try {
    args = parseArgs(argv);
  } catch (e) {
    if (e instanceof UsageError) {
      if (e.message) process.stderr.write(`panelwise: ${e.message}\n`);
      process.stderr.write(`${USAGE}\n`);
      return e.message ? 2 : 0;
    }
    throw e;
  }
  try {
    const set = readTidyCsv(args.file);
    const report = analyzeRatings(set, { bootstrap: args.bootstrap, seed: args.seed });
    process.stdout.write(args.format === 'json' ? `${JSON.stringify(report, null, 2)}\n` : formatReportTable(report, args.file));
    return 0;
  } catch (e) {
    if (e instanceof TidyCsvError) {
      process.stderr.write(`panelwise: ${e.message}\n`);
      return 1;
    }
    process.stderr.write(`panelwise: ${(e as Error).message}\n`);
    return 1;
  }
}

const invokedDirectly = process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href;
if (invokedDirectly) {
  const argv = process.argv.slice(2);
  if ((OPS_COMMANDS as readonly string[]).includes(argv[0] ?? '')) {
    // Loaded only for the operator's commands: `analyze` stays free of the database and server code.
    const { runOpsCommand } = await import('./ops-commands');
    process.exitCode = await runOpsCommand(argv[0] as (typeof OPS_COMMANDS)[number], argv.slice(1));
  } else process.exitCode = main(argv);
}
