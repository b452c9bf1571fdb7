// The prediction band that getTrend samples for charts, on the invented demo lab: it starts where
// the fit starts, passes through the fitted error at the epoch, runs past the due date, and
// crosses the tolerance where the projected exit date says (NIST/SEMATECH e-Handbook 4.5.1.2
// prediction interval, the same `predict` the exit date uses).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openApi, type OpenedLab } from '../../app/api/open';
import { loadBundle, readSampleBundle } from '../../sample-lab/load';
import { clock } from '../fixtures/lab';

let lab: OpenedLab;
beforeAll(async () => {
  lab = openApi(':memory:', { create: true, clock });
  await loadBundle(lab.api, readSampleBundle());
}, 120_000);
afterAll(() => lab.close());

describe('the sampled prediction band', () => {
  it('WG-202: from the fit start past the due date, through the intercept, leaving at the exit date', async () => {
    const t = await lab.api.getTrend('WG-202');
    const withExit = t.frequencies.filter((f) => f.projectedExitDate !== null);
    expect(withExit.length).toBeGreaterThan(0);
    for (const f of t.frequencies) {
      const fit = f.fit;
      if (!fit) {
        expect(f.band).toEqual([]);
        continue;
      }
      const band = f.band;
      expect(band.length).toBeGreaterThan(10);
      expect(band[0]?.date).toBe(fit.fromDate);
      expect(band.at(-1)!.date > (t.dueDate ?? '')).toBe(true);
      // Dates only increase, and the half-width is never below the fitted line's own uncertainty.
      for (let i = 1; i < band.length; i++) expect(band[i]!.date >= band[i - 1]!.date).toBe(true);
      for (const b of band) expect(b.halfWidthPpm).toBeGreaterThan(fit.uInterceptPpm);
      // At the epoch (the newest check) the band is centred on the fitted intercept.
      const atEpoch = band.reduce((best, b) =>
        Math.abs(Date.parse(b.date) - Date.parse(t.epochDate!)) <
        Math.abs(Date.parse(best.date) - Date.parse(t.epochDate!))
          ? b
          : best,
      );
      const days = (Date.parse(atEpoch.date) - Date.parse(t.epochDate!)) / 86_400_000;
      expect(
        Math.abs(atEpoch.predictedPpm - (fit.interceptPpm + (fit.slopePpmPerYear * days) / 365.25)),
      ).toBeLessThan(0.5);
      const outside = (b: (typeof band)[number]) =>
        Math.abs(b.predictedPpm) + b.halfWidthPpm > f.tolerancePpm;
      if (f.projectedExitDate) {
        // Inside before the exit date, outside after it (to a sample's width).
        for (const b of band) {
          if (b.date < f.projectedExitDate && b.date >= t.epochDate!) expect(outside(b)).toBe(false);
          if (b.date > f.projectedExitDate) expect(outside(b)).toBe(true);
        }
        expect(band.some((b) => b.date > f.projectedExitDate!)).toBe(true);
      } else {
        for (const b of band) if (b.date >= t.epochDate!) expect(outside(b)).toBe(false);
      }
    }
  });
});
