import { generateScenario, type Scenario, type ScenarioOptions } from '../../server/demo/generator';

/**
 * Test data with the demo's structure (the same generator as the demo seed), small enough for
 * fast tests. Override any option.
 */
export function smallScenario(overrides: Partial<ScenarioOptions> = {}): Scenario {
  return generateScenario({
    seed: 4242,
    federationSlug: 'test-federation',
    federationName: 'Test Federation of Invented Clubs',
    athletes: 40,
    classifiers: 8,
    firstSeason: 2023,
    seasons: 2,
    assessments: 200,
    twoMemberPanelShare: 0.2,
    drift: { classifierCode: 'C03', from: '2024-07-01', shift: 0.45 },
    conservative: { classifierCode: 'C06', shift: -0.22 },
    ...overrides,
  });
}
