// Radio refractivity of moist air, from temperature, pressure and relative humidity: the air in a
// cavity meter slows the wave, so its resonance scales as 1/n.
// Source: Recommendation ITU-R P.453-14 (08/2019), "The radio refractive index: its formula and
// refractivity data", Annex 1, section 1: eqs (1) to (4) for N, eqs (8) to (10) for the water-vapour
// pressure over water (equation numbers from memory; the constants below were checked against an
// independent implementation of P.453-13, whose formula P.453-14 keeps).

/** Kelvin at 0 degC. */
export const ZERO_CELSIUS_K = 273.15;

// Saturation vapour pressure over water (valid -40 degC to +50 degC per P.453).
const A_HPA = 6.1121;
const B = 18.678;
const C_DEGC = 257.14;
const D_DEGC = 234.5;

/** Enhancement factor EF for water: moist air holds slightly more vapour than pure vapour would. */
export function enhancementFactor(temperatureC: number, pressureHpa: number): number {
  return 1 + 1e-4 * (7.2 + pressureHpa * (0.032 + 5.9e-6 * temperatureC * temperatureC));
}

/** Saturation water-vapour pressure over water, hPa, at total pressure pressureHpa. */
export function saturationVapourPressureHpa(temperatureC: number, pressureHpa: number): number {
  const t = temperatureC;
  return enhancementFactor(t, pressureHpa) * A_HPA * Math.exp(((B - t / D_DEGC) * t) / (t + C_DEGC));
}

/** Water-vapour (partial) pressure e = H es / 100, hPa. */
export function waterVapourPressureHpa(
  temperatureC: number,
  pressureHpa: number,
  humidityPct: number,
): number {
  return (humidityPct * saturationVapourPressureHpa(temperatureC, pressureHpa)) / 100;
}

/** Radio refractivity N = (n - 1) 1e6, from total pressure, temperature and relative humidity. */
export function refractivityN(temperatureC: number, pressureHpa: number, humidityPct: number): number {
  const temperatureK = temperatureC + ZERO_CELSIUS_K;
  const e = waterVapourPressureHpa(temperatureC, pressureHpa, humidityPct);
  const dryPressureHpa = pressureHpa - e;
  return (
    (77.6 * dryPressureHpa) / temperatureK +
    (72 * e) / temperatureK +
    (3.75e5 * e) / (temperatureK * temperatureK)
  );
}

/** Refractive index n = 1 + N 1e-6. */
export function refractiveIndex(temperatureC: number, pressureHpa: number, humidityPct: number): number {
  return 1 + refractivityN(temperatureC, pressureHpa, humidityPct) * 1e-6;
}

export interface RefractivityPartials {
  /** dN/dT, N-units per kelvin (relative humidity held constant). */
  dNdTemperaturePerK: number;
  /** dN/dP, N-units per hPa. */
  dNdPressurePerHpa: number;
  /** dN/dH, N-units per %RH. */
  dNdHumidityPerPct: number;
}

// Central-difference steps: small against the uncertainties of bench conditions, large enough
// that N (about 300, smooth) loses no significant digits in the difference.
const STEP_TEMPERATURE_K = 1e-3;
const STEP_PRESSURE_HPA = 1e-2;
const STEP_HUMIDITY_PCT = 1e-2;

/** Partial derivatives of N by central differences (error O(h^2), far below 1e-6 relative here). */
export function refractivityPartials(
  temperatureC: number,
  pressureHpa: number,
  humidityPct: number,
): RefractivityPartials {
  const t = temperatureC;
  const p = pressureHpa;
  const h = humidityPct;
  return {
    dNdTemperaturePerK:
      (refractivityN(t + STEP_TEMPERATURE_K, p, h) - refractivityN(t - STEP_TEMPERATURE_K, p, h)) /
      (2 * STEP_TEMPERATURE_K),
    dNdPressurePerHpa:
      (refractivityN(t, p + STEP_PRESSURE_HPA, h) - refractivityN(t, p - STEP_PRESSURE_HPA, h)) /
      (2 * STEP_PRESSURE_HPA),
    dNdHumidityPerPct:
      (refractivityN(t, p, h + STEP_HUMIDITY_PCT) - refractivityN(t, p, h - STEP_HUMIDITY_PCT)) /
      (2 * STEP_HUMIDITY_PCT),
  };
}
