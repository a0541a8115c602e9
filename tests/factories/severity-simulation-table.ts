/**
 * The simulation table of decision record 0009: recovery and coverage of the severity model,
 * and the panel-median bias on the same data, over 20 invented federations per scenario.
 *
 *   npx tsx tests/factories/severity-simulation-table.ts
 */
import { classifierSeverity, classifiersVsPanel } from '../../server/analysis';
import { simulateFederation, type SimulationOptions } from './severity-simulation';

function correlation(x: number[], y: number[]): number {
  const n = x.length;
  const mx = x.reduce((s, v) => s + v, 0) / n;
  const my = y.reduce((s, v) => s + v, 0) / n;
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    sxy += (x[i] - mx) * (y[i] - my);
    sxx += (x[i] - mx) ** 2;
    syy += (y[i] - my) ** 2;
  }
  return sxy / Math.sqrt(sxx * syy);
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[s.length >> 1] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

const scenarios: [string, Omit<SimulationOptions, 'seed'>][] = [
  ['A. test scenario: 20 classifiers, 3,000 assessments, error SD 0.10–0.20', { classifiers: 20, assessments: 3000, noise: [0.1, 0.2] }],
  ['B. demo size: 20 classifiers, 2,000 assessments, error SD 0.10–0.20', { classifiers: 20, assessments: 2000, noise: [0.1, 0.2] }],
  ['C. noisier: 24 classifiers, 2,400 assessments, error SD 0.15–0.30', { classifiers: 24, assessments: 2400, noise: [0.15, 0.3] }],
  ['D. demo-like error SD 0.07–0.11, 3,000 assessments', { classifiers: 20, assessments: 3000, noise: [0.07, 0.11] }],
  ['E. tight pools: 95 % of panels regional', { classifiers: 20, assessments: 3000, noise: [0.1, 0.2], regionalShare: 0.95 }],
  ['F. no pools: panels drawn from everyone', { classifiers: 20, assessments: 3000, noise: [0.1, 0.2], regionalShare: 0 }],
  ['G. athletes near a class (± 0.12), error SD 0.10–0.20', { classifiers: 20, assessments: 3000, noise: [0.1, 0.2], classJitter: 0.12 }],
  [
    'H. as the demo: athletes near a class (± 0.12), error SD 0.07–0.11, 2,000 assessments',
    { classifiers: 20, assessments: 2000, noise: [0.07, 0.11], classJitter: 0.12 },
  ],
];

const FEDERATIONS = Number(process.env.FEDERATIONS ?? 20);
console.log(
  '| scenario | min r | median r | max error (pt) | median per-federation max error | coverage of 95 % CI | mean SE (pt) | panel-median bias: median r | its max error (pt) |',
);
console.log('|---|---|---|---|---|---|---|---|---|');
for (const [name, options] of scenarios) {
  const rs: number[] = [];
  const panelRs: number[] = [];
  const fedMax: number[] = [];
  let maxError = 0;
  let panelMax = 0;
  let covered = 0;
  let total = 0;
  let seSum = 0;
  for (let i = 0; i < FEDERATIONS; i++) {
    const f = simulateFederation({ seed: 5000 + i, ...options });
    const sev = classifierSeverity(f.set);
    const truth = sev.classifiers.map((c) => f.planted.get(c.code)!);
    rs.push(
      correlation(
        sev.classifiers.map((c) => c.value!),
        truth,
      ),
    );
    let m = 0;
    for (const c of sev.classifiers) {
      const p = f.planted.get(c.code)!;
      m = Math.max(m, Math.abs(c.value! - p));
      total++;
      seSum += c.se!;
      if (c.ci95![0] <= p && p <= c.ci95![1]) covered++;
    }
    fedMax.push(m);
    maxError = Math.max(maxError, m);
    const panel = classifiersVsPanel(f.set);
    panelRs.push(
      correlation(
        panel.map((c) => c.meanDeviation.value!),
        panel.map((c) => f.planted.get(c.code)!),
      ),
    );
    for (const c of panel) panelMax = Math.max(panelMax, Math.abs(c.meanDeviation.value! - f.planted.get(c.code)!));
  }
  console.log(
    `| ${name} | ${Math.min(...rs).toFixed(3)} | ${median(rs).toFixed(3)} | ${maxError.toFixed(3)} | ${median(fedMax).toFixed(3)} | ${((100 * covered) / total).toFixed(1)} % (${covered}/${total}) | ${(seSum / total).toFixed(3)} | ${median(panelRs).toFixed(2)} | ${panelMax.toFixed(2)} |`,
  );
}
