// External-reference checks of the air refractivity (ITU-R P.453-14 (08/2019), Annex 1, section 1).
import { describe, expect, it } from 'vitest';
import {
  refractiveIndex,
  refractivityN,
  refractivityPartials,
  saturationVapourPressureHpa,
  waterVapourPressureHpa,
} from '../../app/engine/refractivity';

// An independent transcription of the recommendation, written from the text of P.453 (eqs for N,
// e = H es/100, es = EF a exp((b - t/d) t/(t + c)), water: a = 6.1121, b = 18.678, c = 257.14,
// d = 234.5, EF = 1 + 1e-4 (7.2 + P (0.0320 + 5.9e-6 t^2))). Constants checked against the
// ITU-Rpy implementation of P.453-13 (itur/models/itu453.py), which P.453-14 keeps.
function p453N(t: number, pHpa: number, rhPct: number): number {
  const ef = 1 + 1e-4 * (7.2 + pHpa * (0.032 + 5.9e-6 * t ** 2));
  const es = ef * 6.1121 * Math.exp(((18.678 - t / 234.5) * t) / (t + 257.14));
  const e = (rhPct / 100) * es;
  const tk = t + 273.15;
  return 77.6 * ((pHpa - e) / tk) + 72 * (e / tk) + 3.75e5 * (e / tk ** 2);
}

describe('ITU-R P.453-14 refractivity', () => {
  it('matches an independent transcription over the bench range', () => {
    // ITU-R P.453-14 Annex 1 eqs for N and es (transcribed above).
    for (const t of [10, 15, 20, 23, 25, 30]) {
      for (const p of [950, 1000, 1013.25, 1040]) {
        for (const h of [0, 20, 50, 80, 100]) {
          expect(refractivityN(t, p, h)).toBeCloseTo(p453N(t, p, h), 10);
        }
      }
    }
  });

  it('gives N = 319.23 at 20 degC, 1013.25 hPa, 50 %RH (hand computation)', () => {
    // Hand computation from ITU-R P.453-14 Annex 1 (water constants):
    //   EF = 1 + 1e-4 (7.2 + 1013.25 (0.032 + 5.9e-6 * 400)) = 1.0042015
    //   (b - t/d) t/(t + c) = (18.678 - 0.085288) * 20 / 277.14 = 1.341756; exp() = 3.825755
    //   es = 1.0042015 * 6.1121 * 3.825755 = 23.4816 hPa; e = 0.5 es = 11.7408 hPa
    //   dry: 77.6 (1013.25 - 11.7408)/293.15 = 265.110; 72 e/T = 2.884; 3.75e5 e/T^2 = 51.233
    //   N = 319.227
    expect(saturationVapourPressureHpa(20, 1013.25)).toBeCloseTo(23.4816, 4);
    expect(waterVapourPressureHpa(20, 1013.25, 50)).toBeCloseTo(11.7408, 4);
    expect(refractivityN(20, 1013.25, 50)).toBeCloseTo(319.227, 3);
    expect(refractiveIndex(20, 1013.25, 50)).toBeCloseTo(1.000319227, 9);
  });

  it('gives the dry term alone for dry air: N = 77.6 * 1013.25 / 273.15 = 287.857 at 0 degC', () => {
    // ITU-R P.453-14 Annex 1, dry term N_dry = 77.6 Pd/T with e = 0 (RH = 0 %).
    expect(refractivityN(0, 1013.25, 0)).toBeCloseTo(287.857, 3);
    expect(refractivityN(0, 1013.25, 0)).toBeCloseTo((77.6 * 1013.25) / 273.15, 10);
  });

  it('has the signs and sizes of the partial derivatives that the physics requires', () => {
    // Common practice (textbook behaviour of air refractivity near 20 degC): N rises with pressure
    // (about 0.27 N-units/hPa for the dry term, 77.6/293.15 = 0.2647), rises with humidity, and
    // at 50 %RH rises with temperature because the vapour pressure grows faster than 1/T falls.
    const d = refractivityPartials(20, 1013.25, 50);
    expect(d.dNdPressurePerHpa).toBeCloseTo(77.6 / 293.15, 3);
    expect(d.dNdHumidityPerPct).toBeGreaterThan(0.9);
    expect(d.dNdHumidityPerPct).toBeLessThan(1.1);
    // Dry air: dN/dT = -77.6 P / T^2.
    expect(refractivityPartials(20, 1013.25, 0).dNdTemperaturePerK).toBeCloseTo(
      (-77.6 * 1013.25) / 293.15 ** 2,
      5,
    );
  });

  it('partial derivatives agree with wide finite differences of the independent transcription', () => {
    const d = refractivityPartials(23, 1005, 40);
    expect(d.dNdTemperaturePerK).toBeCloseTo((p453N(23.05, 1005, 40) - p453N(22.95, 1005, 40)) / 0.1, 4);
    expect(d.dNdPressurePerHpa).toBeCloseTo((p453N(23, 1005.5, 40) - p453N(23, 1004.5, 40)) / 1, 6);
    expect(d.dNdHumidityPerPct).toBeCloseTo((p453N(23, 1005, 40.5) - p453N(23, 1005, 39.5)) / 1, 6);
  });
});
