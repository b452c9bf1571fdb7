// Thermal expansion of a cavity: every dimension grows by (1 + alpha dT), so every resonance falls
// by the same factor; to first order df/f = -alpha dT.
// Source: uniform isotropic linear expansion of a resonator scaled in all dimensions (the
// resonance of a cavity of fixed shape is inversely proportional to its linear size); common
// practice in cavity wavemeter work, no single published clause.

/** Length scale factor of the cavity at temperatureC relative to referenceC: 1 + alpha (T - Tref). */
export function expansionFactor(alphaPerK: number, temperatureC: number, referenceC: number): number {
  return 1 + alphaPerK * (temperatureC - referenceC);
}

/** Relative shift of the resonance, ppm, exact for uniform expansion: 1/(1 + alpha dT) - 1. */
export function resonanceShiftPpm(alphaPerK: number, temperatureC: number, referenceC: number): number {
  return (1 / expansionFactor(alphaPerK, temperatureC, referenceC) - 1) * 1e6;
}

/** First-order relative shift of the resonance, ppm: -alpha dT. */
export function resonanceShiftFirstOrderPpm(
  alphaPerK: number,
  temperatureC: number,
  referenceC: number,
): number {
  return -alphaPerK * (temperatureC - referenceC) * 1e6;
}
