// Correction to reference conditions (app/engine/correction.ts, thermal.ts).
import { beforeEach, describe, expect, it } from 'vitest';
import {
  correctToReference,
  correctedFrequencyHz,
  correctionSensitivities,
  type CorrectionInputs,
} from '../../app/engine/correction';
import { refractiveIndex } from '../../app/engine/refractivity';
import { resonanceShiftFirstOrderPpm } from '../../app/engine/thermal';

const reference = { temperatureC: 20, pressureHpa: 1013.25, humidityPct: 50 };
const brass = 19e-6; // 1/K; linear expansion of brass, about 19e-6/K (common practice, from memory)

describe('thermal expansion', () => {
  it('a brass cavity 3 K warm resonates 57 ppm low, so its dial reads 57 ppm high', () => {
    // df/f = -alpha dT = -19e-6 * 3 = -57 ppm (uniform expansion; common practice).
    expect(resonanceShiftFirstOrderPpm(brass, 23, 20)).toBeCloseTo(-57, 10);
    const r = correctToReference(9.3e9, { ...reference, temperatureC: 23, alphaPerK: brass }, reference);
    // Correction applied to the reading: 1/(1 + 57e-6) - 1 = -56.9968 ppm.
    expect(r.thermalCorrectionPpm).toBeCloseTo(-56.9968, 4);
    expect(r.thermalCorrectionPpm).toBeLessThan(0);
  });

  it('a cold cavity gets a positive correction', () => {
    const r = correctToReference(9.3e9, { ...reference, temperatureC: 17, alphaPerK: brass }, reference);
    expect(r.thermalCorrectionPpm).toBeCloseTo(57.0032, 4);
  });
});

describe('air correction', () => {
  it('is zero at reference conditions, and the whole correction is then the identity', () => {
    const r = correctToReference(9.3e9, { ...reference, alphaPerK: brass }, reference);
    expect(r.factor).toBe(1);
    expect(r.correctedHz).toBe(9.3e9);
    expect(r.thermalCorrectionPpm).toBe(0);
    expect(r.airCorrectionPpm).toBe(0);
  });

  it('denser air (higher pressure) lowers the resonance, so the reading is corrected down by ~dN ppm', () => {
    // dN/dP is about 0.265 N-units/hPa at 20 degC (77.6/293.15, ITU-R P.453-14 dry term): +20 hPa
    // raises N by ~5.3, and the correction is n_ref/n - 1 = about -5.3 ppm.
    const r = correctToReference(9.3e9, { ...reference, pressureHpa: 1033.25, alphaPerK: brass }, reference);
    expect(r.airCorrectionPpm).toBeLessThan(0);
    expect(r.airCorrectionPpm).toBeCloseTo(-5.29, 1);
    const nRatio = refractiveIndex(20, 1013.25, 50) / refractiveIndex(20, 1033.25, 50);
    expect(r.airCorrectionPpm).toBeCloseTo((nRatio - 1) * 1e6, 9);
  });

  it('the two parts multiply to the whole correction exactly', () => {
    const inputs: CorrectionInputs = {
      temperatureC: 26.5,
      pressureHpa: 990,
      humidityPct: 70,
      alphaPerK: brass,
    };
    const r = correctToReference(33.1e9, inputs, reference);
    const rebuilt = 33.1e9 * (1 + r.thermalCorrectionPpm * 1e-6) * (1 + r.airCorrectionPpm * 1e-6);
    expect(rebuilt / r.correctedHz - 1).toBeCloseTo(0, 14);
  });
});

describe('sensitivities by finite difference of f_c = f_read / g', () => {
  const inputs: CorrectionInputs = {
    temperatureC: 23.4,
    pressureHpa: 1001.7,
    humidityPct: 41,
    alphaPerK: brass,
  };
  const f = 9.3e9;
  let s: ReturnType<typeof correctionSensitivities>;
  beforeEach(() => {
    s = correctionSensitivities(f, inputs, reference);
  });
  const fcAt = (change: Partial<CorrectionInputs>) =>
    correctedFrequencyHz(f, { ...inputs, ...change }, reference);

  it('temperature includes expansion and the air index', () => {
    const fd = (fcAt({ temperatureC: 23.45 }) - fcAt({ temperatureC: 23.35 })) / 0.1;
    expect(s.dTemperatureHzPerK / fd).toBeCloseTo(1, 5);
    // Mostly expansion: about -alpha f = -176.7 kHz/K, plus the air's share (dN/dT about +1.9 N/K).
    expect(s.dTemperatureHzPerK).toBeLessThan(-f * brass);
  });

  it('pressure, humidity and alpha', () => {
    expect(
      s.dPressureHzPerHpa / ((fcAt({ pressureHpa: 1002.2 }) - fcAt({ pressureHpa: 1001.2 })) / 1),
    ).toBeCloseTo(1, 5);
    expect(
      s.dHumidityHzPerPct / ((fcAt({ humidityPct: 41.5 }) - fcAt({ humidityPct: 40.5 })) / 1),
    ).toBeCloseTo(1, 5);
    expect(
      s.dAlphaHzPerPerK / ((fcAt({ alphaPerK: brass + 1e-7 }) - fcAt({ alphaPerK: brass - 1e-7 })) / 2e-7),
    ).toBeCloseTo(1, 5);
    expect(s.dReading).toBeCloseTo(fcAt({}) / f, 15);
  });
});
