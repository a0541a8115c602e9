/**
 * Degenerate cases and the panel-level statistics on small invented data sets whose values
 * can be worked out by hand from the definitions (sources named per test).
 */
import { describe, expect, it } from 'vitest';
import {
  analyzeRatings,
  buildRatingSet,
  classBoundaries,
  classTransitions,
  classifierDrift,
  classifiersVsPanel,
  confusionBetween,
  confusionWithPanel,
  countTable,
  cusum,
  deviationByQuarter,
  filterRatingSet,
  fleissKappa,
  krippendorffNote,
  mulberry32,
  othersMedian,
  RatingInputError,
  seriesByQuarter,
  subsetRatingSet,
  type RatingRow,
} from '../../../server/analysis';
import { DEFAULT_SCALE } from '../../../shared/scale';

/** Rows from a compact description: [assessment, date, athlete, kind, panel class or null, [classifier, class in points]...]. */
function rows(spec: [string, string, string, RatingRow['kind'], number | null, [string, number][]][], event = 'E01'): RatingRow[] {
  return spec.flatMap(([id, date, athlete, kind, panel, ratings]) =>
    ratings.map(([c, v]) => ({
      assessmentId: id,
      athleteCode: athlete,
      eventCode: event,
      assessedOn: date,
      classifierCode: c,
      sportClass: v * 2,
      panelClass: panel === null ? null : panel * 2,
      kind,
    })),
  );
}

const noNaN = (x: unknown) => expect(JSON.stringify(x)).not.toMatch(/NaN|Infinity/);

describe('degenerate data (undefined statistics are null with a reason, never NaN or a made-up value)', () => {
  it('one class used by everyone: kappa, Fleiss and alpha undefined; AC1 = 1 (Gwet 2008, p_e = 0 with q = 8); agreement 1', () => {
    const set = buildRatingSet(
      rows([
        [
          'AS1',
          '2024-01-10',
          'A001',
          'first',
          null,
          [
            ['C01', 2.5],
            ['C02', 2.5],
            ['C03', 2.5],
          ],
        ],
        [
          'AS2',
          '2024-01-10',
          'A002',
          'first',
          null,
          [
            ['C01', 2.5],
            ['C02', 2.5],
          ],
        ],
        [
          'AS3',
          '2024-01-10',
          'A003',
          'first',
          null,
          [
            ['C02', 2.5],
            ['C03', 2.5],
          ],
        ],
      ]),
      DEFAULT_SCALE,
    );
    const r = analyzeRatings(set);
    noNaN(r);
    expect(r.fleissKappa.value).toBeNull();
    expect(r.fleissKappa.reason).toMatch(/expected agreement is 1/);
    expect(r.krippendorffAlpha.nominal.value).toBeNull();
    expect(r.krippendorffAlpha.nominal.reason).toMatch(/expected disagreement is 0/);
    expect(r.gwet.ac1.value).toBe(1);
    expect(r.exactAgreement.unanimous.value).toBe(1);
    expect(r.pairs.every((p) => p.kappa.value === null && typeof p.kappa.reason === 'string')).toBe(true);
    expect(r.fleissKappaByClass['2.5'].value).toBeNull();
    expect(r.fleissKappaByClass['1.0'].reason).toBe('class not used');
  });

  it('a single assessment: defined where the formulas allow, never NaN', () => {
    const set = buildRatingSet(
      rows([
        [
          'AS1',
          '2024-01-10',
          'A001',
          'first',
          3,
          [
            ['C01', 3],
            ['C02', 3.5],
            ['C03', 3],
          ],
        ],
      ]),
      DEFAULT_SCALE,
    );
    const r = analyzeRatings(set);
    noNaN(r);
    expect(r.counts).toMatchObject({ assessments: 1, ratings: 3, classifiers: 3, analysable: 1, notAnalysable: 0 });
    expect(r.exactAgreement.unanimous.value).toBe(0);
    expect(r.withinHalfClassAgreement.unanimous.value).toBe(1);
    // Fleiss (1971) with N = 1: P̄ = 1/3, p = (2/3, 1/3), P_e = 5/9, κ = (1/3 − 5/9)/(4/9) = −1/2.
    expect(r.fleissKappa.value).toBeCloseTo(-0.5, 12);
    expect(r.pairs).toHaveLength(0); // no pair shares two assessments
  });

  it('panels of one are ignored and counted; all panels of one → undefined', () => {
    const set = buildRatingSet(
      rows([
        ['AS1', '2024-01-10', 'A001', 'first', null, [['C01', 3]]],
        ['AS2', '2024-01-10', 'A002', 'first', null, [['C02', 2]]],
      ]),
      DEFAULT_SCALE,
    );
    const r = analyzeRatings(set);
    noNaN(r);
    expect(r.counts.notAnalysable).toBe(2);
    expect(r.counts.analysable).toBe(0);
    expect(r.fleissKappa.value).toBeNull();
    expect(r.exactAgreement.unanimous.value).toBeNull();
    expect(r.krippendorffAlpha.interval.value).toBeNull();
    expect(r.gwet.ac1.value).toBeNull();
    expect(r.classifiers.map((c) => [c.code, c.n, c.ratings])).toEqual([
      ['C01', 0, 1],
      ['C02', 0, 1],
    ]);
    expect(r.classifiers[0].meanDeviation.value).toBeNull();
  });

  it('a panel of one does not change the panel statistics of the others (Krippendorff 2011: unpairable units)', () => {
    const base: Parameters<typeof rows>[0] = [
      [
        'AS1',
        '2024-01-10',
        'A001',
        'first',
        null,
        [
          ['C01', 3],
          ['C02', 3.5],
          ['C03', 3],
        ],
      ],
      [
        'AS2',
        '2024-01-10',
        'A002',
        'first',
        null,
        [
          ['C01', 1.5],
          ['C02', 1.5],
        ],
      ],
      [
        'AS3',
        '2024-01-10',
        'A003',
        'first',
        null,
        [
          ['C02', 4],
          ['C03', 4.5],
        ],
      ],
    ];
    const a = analyzeRatings(buildRatingSet(rows(base), DEFAULT_SCALE));
    const b = analyzeRatings(buildRatingSet(rows([...base, ['AS4', '2024-01-10', 'A004', 'first', null, [['C01', 1]]]]), DEFAULT_SCALE));
    expect(b.counts.notAnalysable).toBe(1);
    expect(b.fleissKappa.value).toBe(a.fleissKappa.value);
    expect(b.krippendorffAlpha.ordinal.value).toBe(a.krippendorffAlpha.ordinal.value);
    expect(b.exactAgreement).toEqual(a.exactAgreement);
  });

  it('a classifier with one rating: listed with n = 1, no SE, no pair (fewer than 2 shared assessments)', () => {
    const set = buildRatingSet(
      rows([
        [
          'AS1',
          '2024-01-10',
          'A001',
          'first',
          null,
          [
            ['C01', 3],
            ['C02', 3.5],
            ['C09', 3],
          ],
        ],
        [
          'AS2',
          '2024-01-10',
          'A002',
          'first',
          null,
          [
            ['C01', 1.5],
            ['C02', 2],
          ],
        ],
        [
          'AS3',
          '2024-01-10',
          'A003',
          'first',
          null,
          [
            ['C01', 4],
            ['C02', 4.5],
          ],
        ],
      ]),
      DEFAULT_SCALE,
    );
    const r = analyzeRatings(set);
    noNaN(r);
    const c9 = r.classifiers.find((c) => c.code === 'C09')!;
    expect(c9.n).toBe(1);
    expect(c9.meanDeviation.value).toBeCloseTo(-0.25, 12); // 3.0 vs median(3.0, 3.5) = 3.25
    expect(c9.meanDeviation.se).toBeNull();
    expect(c9.meanDeviation.ci95).toBeNull();
    expect(r.pairs.map((p) => `${p.a}-${p.b}`)).toEqual(['C01-C02']);
  });

  it('an empty set gives an all-undefined report', () => {
    const r = analyzeRatings(buildRatingSet([], DEFAULT_SCALE));
    noNaN(r);
    expect(r.counts.assessments).toBe(0);
    expect(r.fleissKappa.value).toBeNull();
  });
});

describe('building and subsetting a RatingSet', () => {
  const spec: Parameters<typeof rows>[0] = [
    [
      'AS1',
      '2024-01-10',
      'A001',
      'first',
      3,
      [
        ['C01', 3],
        ['C02', 3.5],
        ['C03', 3],
      ],
    ],
    [
      'AS2',
      '2024-04-02',
      'A002',
      'review',
      null,
      [
        ['C01', 1.5],
        ['C02', 2],
      ],
    ],
    [
      'AS3',
      '2024-07-20',
      'A001',
      'protest',
      3.5,
      [
        ['C02', 3.5],
        ['C03', 3.5],
      ],
    ],
  ];

  it('stores classes as indices on the scale and groups ratings by assessment', () => {
    const set = buildRatingSet(rows(spec), DEFAULT_SCALE);
    expect(set.q).toBe(8);
    expect(Array.from(set.ratingStart)).toEqual([0, 3, 5, 7]);
    expect(Array.from(set.ratingClass)).toEqual([4, 5, 4, 1, 2, 5, 5]);
    expect(Array.from(set.panelClass)).toEqual([4, -1, 5]);
    expect(Array.from(set.kind)).toEqual([0, 1, 2]);
    expect(set.classifierCodes).toEqual(['C01', 'C02', 'C03']);
  });

  it('filters by date range, kind, classifier and event and keeps classifier indices', () => {
    const set = buildRatingSet(rows(spec), DEFAULT_SCALE);
    const q2 = filterRatingSet(set, { from: '2024-04-01', to: '2024-06-30' });
    expect(q2.assessmentIds).toEqual(['AS2']);
    expect(q2.classifierCodes).toBe(set.classifierCodes);
    expect(filterRatingSet(set, { kinds: ['protest', 'review'] }).assessmentIds).toEqual(['AS2', 'AS3']);
    expect(filterRatingSet(set, { classifierCodes: ['C03'] }).assessmentIds).toEqual(['AS1', 'AS3']);
    expect(filterRatingSet(set, { eventCodes: ['E99'] }).assessmentCount).toBe(0);
    const sub = subsetRatingSet(set, (a) => a !== 1);
    expect(Array.from(sub.ratingClassifier)).toEqual([0, 1, 2, 1, 2]);
  });

  it('refuses bad rows with the row, field and value', () => {
    const good = rows(spec);
    const cases: [RatingRow[], RegExp][] = [
      [[...good, { ...good[0], classifierCode: 'C01' }], /row 8: classifierCode "C01" rates assessment AS1 twice/],
      [[{ ...good[0], sportClass: 10 }], /row 1: sportClass "10" is not a class/],
      [[good[0], { ...good[1], athleteCode: 'A777' }], /row 2: athleteCode "A777" differs from row 1/],
      [[{ ...good[0], assessedOn: '2024-02-30' }], /assessedOn "2024-02-30" is not a date/],
      [[good[0], { ...good[1], panelClass: 8 }], /row 2: panelClass "8" differs/],
    ];
    for (const [input, message] of cases) {
      expect(() => buildRatingSet(input, DEFAULT_SCALE)).toThrow(RatingInputError);
      expect(() => buildRatingSet(input, DEFAULT_SCALE)).toThrow(message);
    }
  });
});

describe('classifiers against the panel', () => {
  it('median of the others: odd → middle value, even → mean of the two middle ones (a quarter point possible)', () => {
    const set = buildRatingSet(
      rows([
        [
          'AS1',
          '2024-01-10',
          'A001',
          'first',
          null,
          [
            ['C01', 2],
            ['C02', 2.5],
            ['C03', 3],
            ['C04', 3],
          ],
        ],
      ]),
      DEFAULT_SCALE,
    );
    // Class indices 2, 3, 4, 4. Others of C01: 3, 4, 4 → 4; of C02: 2, 4, 4 → 4; of C03: 2, 3, 4 → 3.
    expect(Array.from(othersMedian(set))).toEqual([4, 4, 3, 3]);
    const pair = buildRatingSet(
      rows([
        [
          'AS1',
          '2024-01-10',
          'A001',
          'first',
          null,
          [
            ['C01', 2],
            ['C02', 2.5],
            ['C03', 3],
          ],
        ],
      ]),
      DEFAULT_SCALE,
    );
    // Others of C02: 2.0 and 3.0 → 2.5 (index 3); of C01: 2.5 and 3.0 → index 3.5 = 2.75 points.
    expect(Array.from(othersMedian(pair))).toEqual([3.5, 3, 2.5]);
  });

  it('bias, exact and within-half rates, and comparison with the recorded final class', () => {
    const set = buildRatingSet(
      rows([
        [
          'AS1',
          '2024-01-10',
          'A001',
          'first',
          3,
          [
            ['C01', 3.5],
            ['C02', 3],
            ['C03', 3],
          ],
        ],
        [
          'AS2',
          '2024-01-11',
          'A002',
          'first',
          2,
          [
            ['C01', 2.5],
            ['C02', 2],
            ['C03', 2],
          ],
        ],
        [
          'AS3',
          '2024-01-12',
          'A003',
          'first',
          null,
          [
            ['C01', 4],
            ['C02', 4],
            ['C03', 4],
          ],
        ],
      ]),
      DEFAULT_SCALE,
    );
    const c = classifiersVsPanel(set);
    const c1 = c.find((x) => x.code === 'C01')!;
    expect(c1.n).toBe(3);
    expect(c1.meanDeviation.value).toBeCloseTo(1 / 3, 12); // (+0.5 + 0.5 + 0) / 3
    expect(c1.exactWithPanel.value).toBeCloseTo(1 / 3, 12);
    expect(c1.withinHalfWithPanel.value).toBe(1);
    expect(c1.withFinalClass.n).toBe(2);
    expect(c1.withFinalClass.meanDeviation.value).toBeCloseTo(0.5, 12);
    const c2 = c.find((x) => x.code === 'C02')!;
    // Others' medians 3.25, 2.25, 4.0 → deviations −0.25, −0.25, 0.
    expect(c2.meanDeviation.value).toBeCloseTo(-1 / 6, 12);
    expect(c2.exactWithPanel.value).toBeCloseTo(1 / 3, 12);
    // Kappa reference: final class where recorded (3.0, 2.0), else the others' median (4.0): all equal to C02.
    expect(c2.quadraticKappaWithPanel.value).toBeCloseTo(1, 12);
  });
});

describe('class boundaries, confusion matrices, transitions, quarters and drift', () => {
  const spec: Parameters<typeof rows>[0] = [
    [
      'AS1',
      '2024-01-10',
      'A001',
      'first',
      3,
      [
        ['C01', 3],
        ['C02', 3.5],
        ['C03', 3],
      ],
    ],
    [
      'AS2',
      '2024-02-10',
      'A002',
      'first',
      2,
      [
        ['C01', 2],
        ['C02', 2],
        ['C03', 2],
      ],
    ],
    [
      'AS3',
      '2024-05-10',
      'A001',
      'review',
      3.5,
      [
        ['C01', 3.5],
        ['C02', 3.5],
      ],
    ],
    [
      'AS4',
      '2024-08-10',
      'A002',
      'protest',
      2,
      [
        ['C02', 2],
        ['C03', 2.5],
      ],
    ],
    [
      'AS5',
      '2024-08-11',
      'A003',
      'first',
      null,
      [
        ['C01', 3],
        ['C03', 3.5],
      ],
    ],
  ];
  const set = buildRatingSet(rows(spec), DEFAULT_SCALE);

  it('boundary split rates: panels with ratings on both sides over panels touching either class', () => {
    const b = classBoundaries(countTable(set), DEFAULT_SCALE);
    expect(b).toHaveLength(7);
    const b30 = b.find((x) => x.lower === '3.0')!;
    // Touching 3.0 or 3.5: AS1, AS3, AS5; split: AS1, AS5.
    expect([b30.splits, b30.n]).toEqual([2, 3]);
    expect(b30.splitRate).toBeCloseTo(2 / 3, 12);
    const b20 = b.find((x) => x.lower === '2.0')!;
    expect([b20.splits, b20.n]).toEqual([1, 2]);
    expect(b.find((x) => x.lower === '1.0')!.splitRate).toBeNull();
  });

  it('confusion matrices count class by class', () => {
    const m = confusionWithPanel(set, 'C01');
    expect(m.n).toBe(3);
    expect(m.counts[4][4]).toBe(1); // 3.0 vs 3.0
    expect(m.counts[2][2]).toBe(1);
    expect(m.counts[5][5]).toBe(1);
    const p = confusionBetween(set, 'C02', 'C01');
    expect(p.n).toBe(3);
    expect(p.counts[5][4]).toBe(1); // C02 3.5, C01 3.0 on AS1
    expect(confusionBetween(set, 'C01', 'C02').counts[4][5]).toBe(1);
  });

  it('transitions between successive assessments of an athlete; share of reviews and protests that changed class', () => {
    const t = classTransitions(set);
    expect(t.n).toBe(2); // A001: 3.0 → 3.5; A002: 2.0 → 2.0
    expect(t.counts[4][5]).toBe(1);
    expect(t.counts[2][2]).toBe(1);
    expect(t.reviewsChanged.value).toBe(1);
    expect(t.protestsChanged.value).toBe(0);
    expect(t.changes).toEqual([{ athleteCode: 'A001', from: '3.0', to: '3.5', on: '2024-05-10', kind: 'review', assessmentId: 'AS3' }]);
  });

  it('series by calendar quarter and deviation by quarter', () => {
    const s = seriesByQuarter(set, (q) => fleissKappa(countTable(q)));
    expect(s.map((x) => [x.quarter, x.assessments])).toEqual([
      ['2024-Q1', 2],
      ['2024-Q2', 1],
      ['2024-Q3', 2],
    ]);
    const d = deviationByQuarter(set, 'C03');
    expect(d.map((x) => x.quarter)).toEqual(['2024-Q1', '2024-Q3']);
    // Q3: AS4 2.5 vs 2.0 (+0.5), AS5 3.5 vs 3.0 (+0.5).
    expect(d[1].result.value).toBeCloseTo(0.5, 12);
  });

  it('CUSUM (Page 1954): no alarm on in-control noise, alarm after a sustained shift, with its date', () => {
    const rng = mulberry32(5);
    const noise = Array.from({ length: 200 }, () => (rng.next() < 0.5 ? -0.25 : 0.25) * (rng.next() < 0.6 ? 0 : 1));
    expect(cusum(noise, { sigma: 0.25 }).firstAlarm).toBeNull();
    const shifted = [...noise, ...Array.from({ length: 30 }, () => 0.5)];
    const r = cusum(shifted, { sigma: 0.25 });
    expect(r.firstAlarm?.direction).toBe('up');
    expect(r.firstAlarm!.index).toBeGreaterThanOrEqual(200);
    expect(r.firstAlarm!.index).toBeLessThan(206); // each +0.5 adds 2 − 0.5 = 1.5 σ; h = 5
    const down = cusum(
      shifted.map((x) => -x),
      { sigma: 0.25, direction: 'down' },
    );
    expect(down.firstAlarm?.direction).toBe('down');
  });

  it('classifier drift: alarm date and assessment from the chronological deviations', () => {
    const spec2: Parameters<typeof rows>[0] = [];
    for (let i = 0; i < 40; i++) {
      const day = String(1 + (i % 28)).padStart(2, '0');
      const month = String(1 + Math.floor(i / 28) * 6).padStart(2, '0');
      const drift = i >= 25 ? 0.5 : 0;
      spec2.push([
        `AS${i}`,
        `2024-${month}-${day}`,
        `A${i}`,
        'first',
        null,
        [
          ['C01', 2.5 + drift],
          ['C02', 2.5],
          ['C03', i % 4 === 0 ? 3 : 2.5],
        ],
      ]);
    }
    const s2 = buildRatingSet(rows(spec2), DEFAULT_SCALE);
    const d = classifierDrift(s2, 'C01', { sigma: 0.25 });
    expect(d.n).toBe(40);
    expect(d.alarm).not.toBeNull();
    expect(d.alarm!.direction).toBe('up');
    expect(d.alarm!.index).toBeGreaterThanOrEqual(25);
    expect(d.alarm!.date).toBe(d.dates[d.alarm!.index]);
    expect(classifierDrift(s2, 'C02', { sigma: 0.25 }).alarms.filter((a) => a.direction === 'up')).toHaveLength(0);
  });

  it("Krippendorff's (2004) reading of alpha", () => {
    expect(krippendorffNote(0.8)).toBe('reliable');
    expect(krippendorffNote(0.7999)).toBe('tentative');
    expect(krippendorffNote(0.667)).toBe('tentative');
    expect(krippendorffNote(0.6669)).toBe('unreliable');
    expect(krippendorffNote(null)).toBeNull();
  });
});
