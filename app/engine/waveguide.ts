// Cut-off and resonance of the guides and cavities a meter is built from: the TE10 cut-off of a
// standard rectangular waveguide (a meter in waveguide cannot be checked below it) and the TE011
// resonance of a cylindrical cavity (the law a plunger-tuned waveguide meter's dial follows).
// Sources: D. M. Pozar, Microwave Engineering, 4th ed. (Wiley, 2012): 3.3, f_c = c / (2a) for
// TE10 of an air-filled rectangular guide; 6.7, f_nml = c / (2 pi sqrt(er)) sqrt((p'_nm / a)^2 +
// (l pi / d)^2) for TE_nml of a cylindrical cavity of radius a and length d, p'_01 = 3.832.
// Guide sizes: EIA RS-261-B (WR designations; broad wall a in inches, from memory).

/** Speed of light in vacuum, m/s (exact, SI). */
export const SPEED_OF_LIGHT_M_PER_S = 299_792_458;

/** First zero of J0' (= J1), the p'_01 of TE01 modes (Pozar table 3.3). */
export const BESSEL_J0_PRIME_ZERO_1 = 3.8317;

/** TE10 cut-off of an air-filled rectangular guide of broad wall a (m). */
export function rectangularTe10CutoffHz(broadWallM: number): number {
  if (!(broadWallM > 0)) throw new Error(`broad wall must be a positive length (got ${broadWallM} m)`);
  return SPEED_OF_LIGHT_M_PER_S / (2 * broadWallM);
}

/** TE011 resonance of a cylindrical cavity of radius a and length d (m), filled with er. */
export function cylindricalTe011Hz(radiusM: number, lengthM: number, relativePermittivity = 1): number {
  if (!(radiusM > 0) || !(lengthM > 0) || !(relativePermittivity >= 1))
    throw new Error('radius and length must be positive, relative permittivity at least 1');
  const k = Math.hypot(BESSEL_J0_PRIME_ZERO_1 / radiusM, Math.PI / lengthM);
  return (SPEED_OF_LIGHT_M_PER_S * k) / (2 * Math.PI * Math.sqrt(relativePermittivity));
}

/** Broad-wall widths of the standard rectangular guides, inches (EIA RS-261-B; from memory). */
export const WAVEGUIDE_BROAD_WALL_IN: Readonly<Record<string, number>> = {
  'WR-284': 2.84,
  'WR-187': 1.872,
  'WR-137': 1.372,
  'WR-112': 1.122,
  'WR-90': 0.9,
  'WR-75': 0.75,
  'WR-62': 0.622,
  'WR-51': 0.51,
  'WR-42': 0.42,
  'WR-34': 0.34,
  'WR-28': 0.28,
  'WR-22': 0.224,
  'WR-19': 0.188,
  'WR-15': 0.148,
  'WR-12': 0.122,
  'WR-10': 0.1,
};

/** TE10 cut-off of a standard guide named like "WR-90" or "WR90" anywhere in the text, or null. */
export function standardGuideCutoffHz(designation: string): { size: string; cutoffHz: number } | null {
  const m = /WR-?\s?(\d+)/i.exec(designation);
  if (!m) return null;
  const size = `WR-${m[1]}`;
  const inches = WAVEGUIDE_BROAD_WALL_IN[size];
  if (inches === undefined) return null;
  return { size, cutoffHz: rectangularTe10CutoffHz(inches * 0.0254) };
}
