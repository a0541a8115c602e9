/**
 * Words shown beside a coefficient (never instead of it).
 *
 * Landis & Koch (1977, Biometrics 33:159–174, p. 165) bands for kappa-type coefficients:
 * < 0 Poor, 0.00–0.20 Slight, 0.21–0.40 Fair, 0.41–0.60 Moderate, 0.61–0.80 Substantial,
 * 0.81–1.00 Almost Perfect. The printed ranges leave gaps (0.205 is in none); the engine
 * closes them half-open on the upper end: (−∞, 0) Poor, [0, 0.20] Slight, (0.20, 0.40] Fair,
 * (0.40, 0.60] Moderate, (0.60, 0.80] Substantial, (0.80, 1] Almost Perfect. The authors call
 * the bands arbitrary benchmarks, not tests.
 *
 * Krippendorff (2004, Content Analysis, 2nd ed., p. 241): rely on α ≥ .800; draw only tentative
 * conclusions from .667 ≤ α < .800; below that, do not rely on the data.
 */
export type LandisKochLabel = 'Poor' | 'Slight' | 'Fair' | 'Moderate' | 'Substantial' | 'Almost Perfect';

export function landisKochLabel(value: number | null): LandisKochLabel | null {
  if (value === null || !Number.isFinite(value)) return null;
  if (value < 0) return 'Poor';
  if (value <= 0.2) return 'Slight';
  if (value <= 0.4) return 'Fair';
  if (value <= 0.6) return 'Moderate';
  if (value <= 0.8) return 'Substantial';
  return 'Almost Perfect';
}

export type KrippendorffNote = 'reliable' | 'tentative' | 'unreliable';

/** Krippendorff's (2004) rule of thumb for alpha. */
export function krippendorffNote(alpha: number | null): KrippendorffNote | null {
  if (alpha === null || !Number.isFinite(alpha)) return null;
  if (alpha >= 0.8) return 'reliable';
  if (alpha >= 0.667) return 'tentative';
  return 'unreliable';
}

export const INTERPRETATION_SOURCES = {
  landisKoch: 'Landis & Koch (1977), Biometrics 33:159–174, p. 165; gaps closed half-open on the upper end',
  krippendorff: 'Krippendorff (2004), Content Analysis, 2nd ed., p. 241: rely on α ≥ .800; tentative for .667 ≤ α < .800',
} as const;
