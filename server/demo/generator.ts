import { DEFAULT_SCALE, type ClassScale, type HalfPoints } from '../../shared/scale';
import { createRandom, type Random } from './random';
import type { AssessmentKind } from '../../shared/schemas/common';

/**
 * Generates an invented classification programme: a fictional federation with fictional
 * classifiers, athletes and events. The demo seed and the tests' data factories both use it,
 * so what the tests exercise has the demo's structure:
 *
 * - most disagreement at the 1.0/1.5 and 2.5/3.0 boundaries (athletes whose functional
 *   profile sits between those classes);
 * - one classifier drifting half a class upwards from a date on (`drift`);
 * - one classifier systematically conservative: about a quarter class lower than the panel;
 * - some athletes whose class changes on review, and a few protests.
 *
 * Everything is deterministic for a given `seed`.
 */

export interface ScenarioOptions {
  seed: number;
  federationSlug: string;
  federationName: string;
  athletes: number;
  classifiers: number;
  /** First season's starting year: season Y runs from September Y to June Y+1. */
  firstSeason: number;
  seasons: number;
  /** Approximate number of assessments to generate. */
  assessments: number;
  /** Share of panels with two classifiers instead of three. */
  twoMemberPanelShare: number;
  /** Classifier code that drifts upwards, and the date it starts. */
  drift?: { classifierCode: string; from: string; shift: number };
  /** Classifier code that rates lower than the panel, and by how much (in points). */
  conservative?: { classifierCode: string; shift: number };
  scale?: ClassScale;
}

export interface ScenarioClassifier {
  code: string;
  displayName: string;
  certificationLevel: 'trainee' | 'national' | 'international';
}

export interface ScenarioAthlete {
  code: string;
  displayName: string;
  category: string;
}

export interface ScenarioEvent {
  code: string;
  name: string;
  startsOn: string;
  endsOn: string;
  level: string;
}

export interface ScenarioRating {
  classifierCode: string;
  sportClass: HalfPoints;
}

export interface ScenarioAssessment {
  externalId: string;
  athleteCode: string;
  eventCode: string;
  assessedOn: string;
  kind: AssessmentKind;
  panelClass: HalfPoints;
  ratings: ScenarioRating[];
}

export interface Scenario {
  federation: { slug: string; name: string; scale: ClassScale };
  classifiers: ScenarioClassifier[];
  athletes: ScenarioAthlete[];
  events: ScenarioEvent[];
  assessments: ScenarioAssessment[];
}

export const DEMO_SCENARIO: ScenarioOptions = {
  seed: 20261202,
  federationSlug: 'kestrel-coast',
  federationName: 'Kestrel Coast Wheelchair Basketball Federation',
  athletes: 300,
  classifiers: 20,
  firstSeason: 2022,
  seasons: 4,
  assessments: 2000,
  twoMemberPanelShare: 0.15,
  drift: { classifierCode: 'C05', from: '2024-07-01', shift: 0.45 },
  conservative: { classifierCode: 'C12', shift: -0.22 },
};

/** A second, small federation so that memberships in several federations can be shown. */
export const SECOND_DEMO_SCENARIO: ScenarioOptions = {
  seed: 77,
  federationSlug: 'harbour-cities',
  federationName: 'Harbour Cities Wheelchair Basketball League',
  athletes: 40,
  classifiers: 6,
  firstSeason: 2024,
  seasons: 2,
  assessments: 160,
  twoMemberPanelShare: 0.3,
};

const FIRST_NAMES = [
  'Ansel',
  'Brisa',
  'Corin',
  'Dalia',
  'Emrys',
  'Fenna',
  'Galen',
  'Hesper',
  'Ivo',
  'Jorun',
  'Kasimir',
  'Liesl',
  'Marek',
  'Nerys',
  'Oskar',
  'Perrin',
  'Quilla',
  'Rosmund',
  'Soren',
  'Talia',
  'Ulric',
  'Vesna',
  'Wendel',
  'Xanthe',
  'Yorick',
  'Zelma',
  'Aubrin',
  'Belka',
  'Casimo',
  'Delphy',
  'Elowen',
  'Farro',
  'Gisla',
  'Halvard',
  'Isolde',
  'Jaspen',
  'Kerrin',
  'Lumi',
  'Maelis',
  'Nilo',
  'Orla',
  'Pim',
  'Rhosyn',
  'Sabeth',
  'Tamsin',
  'Vidar',
];
const SURNAMES = [
  'Ashgrove',
  'Brackwater',
  'Coldmere',
  'Dunhallow',
  'Eastmarch',
  'Fernlow',
  'Greyhaven',
  'Hollinby',
  'Ironmoss',
  'Juniperfield',
  'Kestwick',
  'Larkmoor',
  'Mistleby',
  'Northwold',
  'Oakenshore',
  'Pellbridge',
  'Quarrington',
  'Rookhallow',
  'Saltmarsh',
  'Thistlewood',
  'Umberfell',
  'Vantorre',
  'Wrenfield',
  'Yarrowby',
  'Zeldermoor',
  'Applecross',
  'Brightwater',
  'Cindervale',
  'Driftmoor',
  'Emberly',
  'Foxhollow',
  'Glimmerton',
];

/** Relative frequency of each class 1.0 … 4.5 among the invented athletes. */
const CLASS_WEIGHTS = [0.2, 0.08, 0.12, 0.1, 0.14, 0.1, 0.12, 0.14];
const CATEGORIES: [string, number][] = [
  ['men', 0.55],
  ['women', 0.3],
  ['junior', 0.15],
];

const pad = (n: number, width: number) => String(n).padStart(width, '0');

function weighted<T>(random: Random, items: [T, number][]): T {
  const total = items.reduce((s, [, w]) => s + w, 0);
  let u = random.next() * total;
  for (const [item, w] of items) {
    u -= w;
    if (u <= 0) return item;
  }
  return items[items.length - 1][0];
}

function addDays(iso: string, days: number): string {
  const d = new Date(`${iso}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + days);
  return d.toISOString().slice(0, 10);
}

function uniqueNames(random: Random, count: number, taken: Set<string>): string[] {
  const names: string[] = [];
  while (names.length < count) {
    const name = `${random.pick(FIRST_NAMES)} ${random.pick(SURNAMES)}`;
    if (taken.has(name)) continue;
    taken.add(name);
    names.push(name);
  }
  return names;
}

interface AthleteState {
  code: string;
  /** Latent functional profile on the points scale (1.0 … 4.5). */
  profile: number;
  /** From this date on, the profile moves by `changeBy` (a class that changes on review). */
  changeFrom?: string;
  changeBy: number;
  joinsAt: number;
  assessments: number;
}

export function generateScenario(options: ScenarioOptions): Scenario {
  const scale = options.scale ?? DEFAULT_SCALE;
  const random = createRandom(options.seed);
  const names = new Set<string>();

  // Roster: about a quarter international, a tenth trainees.
  const classifierNames = uniqueNames(random, options.classifiers, names);
  const classifiers: ScenarioClassifier[] = classifierNames.map((displayName, i) => ({
    code: `C${pad(i + 1, 2)}`,
    displayName,
    certificationLevel: i % 4 === 0 ? 'international' : i % 10 === 9 ? 'trainee' : 'national',
  }));
  const noiseOf = new Map(
    classifiers.map((c) => [c.code, c.certificationLevel === 'trainee' ? 0.11 : c.certificationLevel === 'international' ? 0.07 : 0.085]),
  );

  // Events: six a season (four league rounds, a cup, a championship).
  const events: ScenarioEvent[] = [];
  for (let s = 0; s < options.seasons; s++) {
    const year = options.firstSeason + s;
    const season = `${String(year).slice(2)}${String(year + 1).slice(2)}`;
    const plan: [string, string, string, string][] = [
      ['R1', 'League round 1', `${year}-10-08`, 'national'],
      ['R2', 'League round 2', `${year}-12-03`, 'national'],
      ['R3', 'League round 3', `${year + 1}-02-04`, 'national'],
      ['CUP', 'Coastal Cup', `${year + 1}-03-11`, 'national'],
      ['R4', 'League round 4', `${year + 1}-04-15`, 'national'],
      ['CH', 'National championship', `${year + 1}-06-10`, 'championship'],
    ];
    for (const [suffix, name, startsOn, level] of plan) {
      events.push({
        code: `S${season}-${suffix}`,
        name: `${name} ${year}–${String(year + 1).slice(2)}`,
        startsOn,
        endsOn: addDays(startsOn, 2),
        level,
      });
    }
  }

  // Athletes: about 60% are on the books from the first event, the rest join later.
  const athleteNames = uniqueNames(random, options.athletes, names);
  const classValues = Array.from({ length: 8 }, (_, i) => 1 + i / 2);
  const athletes: ScenarioAthlete[] = [];
  const states: AthleteState[] = [];
  for (let i = 0; i < options.athletes; i++) {
    const code = `A${pad(i + 1, 4)}`;
    athletes.push({ code, displayName: athleteNames[i], category: weighted(random, CATEGORIES) });
    const cls = weighted(
      random,
      classValues.map((v, k) => [v, CLASS_WEIGHTS[k]] as [number, number]),
    );
    let profile = cls + (random.next() - 0.5) * 0.24;
    // Athletes between 1.0 and 1.5, or between 2.5 and 3.0, are where panels split most.
    if ((cls === 1 || cls === 1.5) && random.chance(0.4)) profile = 1.25 + (random.next() - 0.5) * 0.12;
    if ((cls === 2.5 || cls === 3) && random.chance(0.4)) profile = 2.75 + (random.next() - 0.5) * 0.12;
    const joinsAt = random.chance(0.6) ? 0 : 1 + random.int(events.length - 1);
    const state: AthleteState = { code, profile, changeBy: 0, joinsAt, assessments: 0 };
    if (random.chance(0.12)) {
      const at = events[Math.min(events.length - 1, joinsAt + 2 + random.int(6))];
      state.changeFrom = at.startsOn;
      state.changeBy = profile > 4 ? -0.5 : profile < 1.5 ? 0.5 : random.chance(0.5) ? 0.5 : -0.5;
    }
    states.push(state);
  }

  const firsts = states.length;
  const reviewsPerEvent = Math.max(1, Math.round((options.assessments - firsts) / events.length));
  const assessments: ScenarioAssessment[] = [];
  const chairs = classifiers.filter((c) => c.certificationLevel === 'international');

  const rate = (state: AthleteState, classifierCode: string, on: string): HalfPoints => {
    let value = state.profile + (state.changeFrom && on >= state.changeFrom ? state.changeBy : 0);
    if (options.drift && classifierCode === options.drift.classifierCode && on >= options.drift.from) value += options.drift.shift;
    if (options.conservative && classifierCode === options.conservative.classifierCode) value += options.conservative.shift;
    value += random.normal() * noiseOf.get(classifierCode)!;
    return Math.min(scale.max, Math.max(scale.min, Math.round(value * 2)));
  };

  events.forEach((event, eventIndex) => {
    const due: { state: AthleteState; kind: ScenarioAssessment['kind'] }[] = [];
    for (const state of states) if (state.joinsAt === eventIndex) due.push({ state, kind: 'first' });
    const onBooks = states.filter((s) => s.joinsAt < eventIndex);
    // Athletes with fewer assessments are observed first; a changed profile draws a review.
    const ranked = random.sample(onBooks, onBooks.length).sort((a, b) => {
      const changedA = a.changeFrom && a.changeFrom <= event.startsOn ? -1 : 0;
      const changedB = b.changeFrom && b.changeFrom <= event.startsOn ? -1 : 0;
      return changedA - changedB || a.assessments - b.assessments;
    });
    for (const state of ranked.slice(0, reviewsPerEvent)) {
      due.push({ state, kind: random.chance(0.015) ? 'protest' : 'review' });
    }

    let day = 0;
    for (const { state, kind } of due) {
      const assessedOn = addDays(event.startsOn, day++ % 3);
      const size = random.chance(options.twoMemberPanelShare) ? 2 : 3;
      const chair = chairs.length > 0 ? random.pick(chairs) : classifiers[0];
      const others = random.sample(
        classifiers.filter((c) => c !== chair),
        size - 1,
      );
      const panel = [chair, ...others];
      const ratings = panel.map((c) => ({ classifierCode: c.code, sportClass: rate(state, c.code, assessedOn) }));
      const sorted = ratings.map((r) => r.sportClass).sort((a, b) => a - b);
      // The panel's final class: the median of three; with two who differ, the chair decides.
      const panelClass = size === 3 ? sorted[1] : ratings[0].sportClass;
      state.assessments++;
      assessments.push({
        externalId: `${options.federationSlug.slice(0, 2).toUpperCase()}-${pad(assessments.length + 1, 5)}`,
        athleteCode: state.code,
        eventCode: event.code,
        assessedOn,
        kind,
        panelClass,
        ratings,
      });
    }
  });

  return {
    federation: { slug: options.federationSlug, name: options.federationName, scale },
    classifiers,
    athletes,
    events,
    assessments,
  };
}
