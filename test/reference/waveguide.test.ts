// Guide cut-offs and cavity resonances against outside sources: TE10 cut-off of standard
// rectangular guides (EIA RS-261-B sizes; f_c = c / 2a, Pozar 4th ed. 3.3) and Pozar's cylindrical
// cavity design example (4th ed., section 6.7: TE011 at 5.0 GHz).
import { describe, expect, it } from 'vitest';
import {
  cylindricalTe011Hz,
  rectangularTe10CutoffHz,
  standardGuideCutoffHz,
} from '../../app/engine/waveguide';
import { fitDialChart, modelFrequencyHz } from '../../app/engine/dial-chart';

describe('TE10 cut-off of standard rectangular waveguides (EIA RS-261-B, f_c = c / 2a)', () => {
  it('WR-90 (a = 22.86 mm) cuts off at 6.557 GHz', () => {
    expect(rectangularTe10CutoffHz(22.86e-3) / 1e9).toBeCloseTo(6.557, 3);
    expect(standardGuideCutoffHz('WR-90')?.cutoffHz).toBeCloseTo(rectangularTe10CutoffHz(22.86e-3), 0);
  });

  // Tabulated cut-offs of other sizes, from memory (they follow from a = WR number / 100 in).
  it.each([
    ['WR-284', 2.078],
    ['WR-187', 3.152],
    ['WR-137', 4.301],
    ['WR-62', 9.488],
    ['WR-42', 14.051],
    ['WR-28', 21.077],
    ['WR-15', 39.875],
    ['WR-10', 59.015],
  ])('%s cuts off at %f GHz', (size, ghz) => {
    expect((standardGuideCutoffHz(`waveguide ${size} flange`)?.cutoffHz ?? 0) / 1e9).toBeCloseTo(ghz, 2);
  });

  it('an unknown designation gives no cut-off rather than a guess', () => {
    expect(standardGuideCutoffHz('N female')).toBeNull();
    expect(standardGuideCutoffHz('WR-999')).toBeNull();
  });
});

describe('cylindrical TE011 cavity (Pozar, Microwave Engineering, 4th ed., 6.7, design example)', () => {
  // Example (from memory): a Teflon-filled (er = 2.08) copper cavity with d = 2a for TE011 at
  // 5.0 GHz has a = 2.74 cm, d = 5.48 cm.
  it("a = 2.74 cm, d = 5.48 cm, er = 2.08 resonate at 5.0 GHz (to the example's 3 figures)", () => {
    expect(cylindricalTe011Hz(2.74e-2, 5.48e-2, 2.08) / 1e9).toBeCloseTo(5.0, 1);
    expect(Math.abs(cylindricalTe011Hz(2.74e-2, 5.48e-2, 2.08) / 5e9 - 1)).toBeLessThan(0.003);
  });

  it('the dial model f^2 = A + C / (d - d0)^2 is the same law: a plunger-tuned air cavity is fitted exactly and its radius recovered', () => {
    // Air-filled, radius 2.74 cm, length 40 mm minus 0.5 mm per division.
    const points = [0, 4, 8, 12, 16, 20].map((d) => ({
      divisions: d,
      frequencyHz: cylindricalTe011Hz(2.74e-2, 0.04 - 0.0005 * d),
    }));
    const fit = fitDialChart(points, 250);
    expect(fit.model.kind).toBe('cylindrical-te011');
    if (fit.model.kind !== 'cylindrical-te011') return;
    expect(fit.model.equivalentRadiusM).toBeCloseTo(2.74e-2, 6);
    expect(fit.maxResidualPpm).toBeLessThan(0.01);
    expect(modelFrequencyHz(fit.model, 10) / cylindricalTe011Hz(2.74e-2, 0.035)).toBeCloseTo(1, 9);
  });
});
