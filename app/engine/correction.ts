// Correction of a dial indication to the meter's reference (graduation) conditions.
// A cavity resonates at a frequency proportional to 1/(n L). The dial was graduated at reference
// conditions (Tref, Pref, RHref). At the bench the cavity is longer by (1 + alpha (T - Tref)) and
// the air index is n instead of n_ref, so a dial position graduated f_x resonates at
// f_x / g, with g = (1 + alpha (T - Tref)) (n / n_ref). The reading corrected to reference
// conditions is therefore f_c = f_read / g.
// Sources: ITU-R P.453-14 (08/2019) for n (see refractivity.ts); uniform expansion (thermal.ts).

import type { ReferenceConditions } from './model';
import { expansionFactor } from './thermal';
import { refractiveIndex, refractivityPartials } from './refractivity';

/** The bench state that the correction depends on; the variables of f_c for the budget. */
export interface CorrectionInputs {
  temperatureC: number;
  pressureHpa: number;
  humidityPct: number;
  alphaPerK: number;
}

export interface CorrectionResult {
  correctedHz: number;
  /** g = (1 + alpha dT) (n / n_ref); the reading is divided by it. */
  factor: number;
  /** Correction applied to the reading for expansion, ppm: (1/(1 + alpha dT) - 1) 1e6.
   * Negative when the bench is warmer than the reference (the meter then reads high). */
  thermalCorrectionPpm: number;
  /** Correction applied to the reading for the air, ppm: (n_ref/n - 1) 1e6.
   * Negative when the bench air is denser or wetter than the reference air. */
  airCorrectionPpm: number;
  refractiveIndex: number;
  referenceRefractiveIndex: number;
}

/** g(T, P, RH, alpha) = (1 + alpha (T - Tref)) n(T, P, RH) / n(Tref, Pref, RHref). */
export function correctionFactor(inputs: CorrectionInputs, reference: ReferenceConditions): number {
  const n = refractiveIndex(inputs.temperatureC, inputs.pressureHpa, inputs.humidityPct);
  const nRef = refractiveIndex(reference.temperatureC, reference.pressureHpa, reference.humidityPct);
  return expansionFactor(inputs.alphaPerK, inputs.temperatureC, reference.temperatureC) * (n / nRef);
}

/** f_c = f_read / g: the model function, differentiated for the budget's sensitivities. */
export function correctedFrequencyHz(
  readingHz: number,
  inputs: CorrectionInputs,
  reference: ReferenceConditions,
): number {
  return readingHz / correctionFactor(inputs, reference);
}

/** Corrects a reading and states the two parts of the correction (their product is exact:
 * f_c = f_read (1 + thermal 1e-6)(1 + air 1e-6)). */
export function correctToReference(
  readingHz: number,
  inputs: CorrectionInputs,
  reference: ReferenceConditions,
): CorrectionResult {
  const n = refractiveIndex(inputs.temperatureC, inputs.pressureHpa, inputs.humidityPct);
  const nRef = refractiveIndex(reference.temperatureC, reference.pressureHpa, reference.humidityPct);
  const expansion = expansionFactor(inputs.alphaPerK, inputs.temperatureC, reference.temperatureC);
  const factor = expansion * (n / nRef);
  return {
    correctedHz: readingHz / factor,
    factor,
    thermalCorrectionPpm: (1 / expansion - 1) * 1e6,
    airCorrectionPpm: (nRef / n - 1) * 1e6,
    refractiveIndex: n,
    referenceRefractiveIndex: nRef,
  };
}

export interface CorrectionSensitivities {
  /** d f_c / dT, Hz per kelvin: expansion and the temperature dependence of n together. */
  dTemperatureHzPerK: number;
  /** d f_c / dP, Hz per hPa. */
  dPressureHzPerHpa: number;
  /** d f_c / dRH, Hz per %RH. */
  dHumidityHzPerPct: number;
  /** d f_c / d alpha, Hz per (1/K). */
  dAlphaHzPerPerK: number;
  /** d f_c / d f_read, dimensionless: 1/g. */
  dReading: number;
}

/**
 * Sensitivities of f_c = f_read / g. Taken through d ln g, which is well conditioned:
 * d f_c/dx = -f_c d ln g/dx, d ln g/dT = alpha/(1 + alpha dT) + (dN/dT 1e-6)/n,
 * d ln g/dP = (dN/dP 1e-6)/n, d ln g/dRH = (dN/dRH 1e-6)/n, d ln g/d alpha = dT/(1 + alpha dT).
 * dN/dx come from central differences of the P.453 formula (refractivity.ts).
 */
export function correctionSensitivities(
  readingHz: number,
  inputs: CorrectionInputs,
  reference: ReferenceConditions,
): CorrectionSensitivities {
  const result = correctToReference(readingHz, inputs, reference);
  const fc = result.correctedHz;
  const n = result.refractiveIndex;
  const deltaTK = inputs.temperatureC - reference.temperatureC;
  const expansion = expansionFactor(inputs.alphaPerK, inputs.temperatureC, reference.temperatureC);
  const partials = refractivityPartials(inputs.temperatureC, inputs.pressureHpa, inputs.humidityPct);
  return {
    dTemperatureHzPerK: -fc * (inputs.alphaPerK / expansion + (partials.dNdTemperaturePerK * 1e-6) / n),
    dPressureHzPerHpa: -fc * ((partials.dNdPressurePerHpa * 1e-6) / n),
    dHumidityHzPerPct: -fc * ((partials.dNdHumidityPerPct * 1e-6) / n),
    dAlphaHzPerPerK: -fc * (deltaTK / expansion),
    dReading: 1 / result.factor,
  };
}
