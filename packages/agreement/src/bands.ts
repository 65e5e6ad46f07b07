/**
 * Interpretation bands. Boundaries: a value on a cut point belongs to the lower band for Landis & Koch
 * (their ranges are closed above: 0.00-0.20, 0.21-0.40, ...), and to the upper band for Krippendorff's
 * thresholds (alpha >= .800, alpha >= .667). Values are compared unrounded.
 */
export type LandisKochBand = 'poor' | 'slight' | 'fair' | 'moderate' | 'substantial' | 'almost perfect';

/** Landis & Koch (1977) Biometrics 33:159-174, p.165. The 'poor' label for values below 0 is from memory of the paper. */
export function landisKoch(value: number): LandisKochBand {
  if (value < 0) return 'poor';
  if (value <= 0.2) return 'slight';
  if (value <= 0.4) return 'fair';
  if (value <= 0.6) return 'moderate';
  if (value <= 0.8) return 'substantial';
  return 'almost perfect';
}

export type KrippendorffBand = 'reliable' | 'tentative' | 'unreliable';

/**
 * Krippendorff (2004) Content Analysis 2nd ed.: rely on variables with alpha >= .800; draw tentative
 * conclusions only from .667 <= alpha < .800. Page (p.241) from memory, unconfirmed.
 */
export function krippendorffBand(value: number): KrippendorffBand {
  if (value >= 0.8) return 'reliable';
  if (value >= 0.667) return 'tentative';
  return 'unreliable';
}
