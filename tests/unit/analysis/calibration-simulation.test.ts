/**
 * The simulation of decision record 0008 on a smaller scale (the record's table comes from
 * `npm run simulate:flags`, 200 federations per scenario): with the default thresholds, the
 * share of in-control federations with a false flag stays at or below 10 % per rule, and the
 * planted effects are caught by their own rule and not mistaken for another.
 */
import { describe, expect, it } from 'vitest';
import { runScenario, simulateFederation, STUDY_SCENARIOS } from '../../../server/analysis/calibration-simulation';
import { observedAgreement, compressPatterns, countTable } from '../../../server/analysis';
import { DEFAULT_FLAG_THRESHOLDS } from '../../../shared/schemas/analytics';

const scenario = (name: string) => STUDY_SCENARIOS.find((s) => s.name.startsWith(name))!;
const SEED = 11; // not the record's seed (2026): these are federations the record has not seen

describe('calibration rules on simulated federations', () => {
  it('a simulated in-control federation has 16–20 classifiers and a realistic miss rate (panels unanimous 55–85 %)', () => {
    for (let s = 0; s < 5; s++) {
      const fed = simulateFederation({ seed: s });
      expect(fed.classifiers.length).toBeGreaterThanOrEqual(16);
      expect(fed.classifiers.length).toBeLessThanOrEqual(20);
      const unanimous = observedAgreement(compressPatterns(countTable(fed.set), 1)).exact.unanimous.value!;
      expect(unanimous).toBeGreaterThan(0.55);
      expect(unanimous).toBeLessThan(0.85);
    }
  });

  it('in control (30 federations): false flags per rule and federation at or below 10 %', () => {
    const r = runScenario(scenario('in control'), 30, SEED, DEFAULT_FLAG_THRESHOLDS);
    expect(r.falseFlag.bias).toBeLessThanOrEqual(0.1);
    expect(r.falseFlag.drift).toBeLessThanOrEqual(0.1);
    expect(r.falseFlag.agreement).toBeLessThanOrEqual(0.1);
  }, 60_000);

  it('a half-class drift after 30 ratings (12 federations): found, upwards, and no false flags beyond 10 % on the others', () => {
    const r = runScenario(scenario('drift +0.5 after 30'), 12, SEED, DEFAULT_FLAG_THRESHOLDS);
    expect(r.planted!.drift).toBeGreaterThanOrEqual(0.9);
    expect(r.driftDirectionRight).toBe(1);
    expect(r.medianChangeError!).toBeLessThanOrEqual(5);
    expect(r.falseFlag.drift).toBeLessThanOrEqual(0.1);
  }, 60_000);

  it('a quarter-class lean (12 federations): `bias`, not `drift`', () => {
    const r = runScenario(scenario('lean −0.25'), 12, SEED, DEFAULT_FLAG_THRESHOLDS);
    expect(r.planted!.bias).toBeGreaterThanOrEqual(0.9);
    expect(r.planted!.drift).toBeLessThanOrEqual(0.1);
  }, 60_000);

  it('an erratic classifier, half a class both ways on 40 % of ratings (12 federations): `agreement`, not `drift` or `bias`', () => {
    const r = runScenario(scenario('erratic'), 12, SEED, DEFAULT_FLAG_THRESHOLDS);
    expect(r.planted!.agreement).toBeGreaterThanOrEqual(0.9);
    expect(r.planted!.drift).toBeLessThanOrEqual(0.1);
    expect(r.planted!.bias).toBeLessThanOrEqual(0.1);
  }, 60_000);
});
