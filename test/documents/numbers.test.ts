// The numbers documents print, read back from the PDF text: SI prefixes instead of e-notation,
// no float noise, the uncertainty to two significant digits (JCGM 100:2008 7.2.6), the
// thermal coefficient in ppm/K (SI Brochure 9th ed. 5.4.4: no prefix on a kelvin raised to a
// power), one wording for the probability of conformity, and the tolerance at its stated value.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ghz, ghzDecimalsFor } from '../../app/documents/words';
import { demoLab, HAS_POPPLER, pdfText, writeTemp, type DemoLab } from './fixture';

// A digit, e or E, an optional sign and a digit: "1.03e+5", "4.00E6".
const E_NOTATION = /\d[eE][+-]?\d/;
// After a decimal marker, six or more 9s and a last digit, or six or more 0s between non-zero
// digits: "965.9499999999999", "0.30000000000000004".
const FLOAT_NOISE = /\.\d*(?:9{6,}\d|[1-9]0{6,}[1-9])(?!\d)/;

let demo: DemoLab;
const texts: Record<string, string> = {};

beforeAll(async () => {
  demo = await demoLab();
  const issue = async (kind: 'certificate' | 'sheet', checkId: number) => {
    const doc =
      kind === 'certificate'
        ? await demo.lab.api.issueCertificate({ checkId })
        : await demo.lab.api.issueSheet({ checkId });
    const file = writeTemp(demo.dir, `${kind}-${checkId}.pdf`, Buffer.from(doc.pdfBase64, 'base64'));
    // Key fingerprints are hexadecimal groups ("a6e6"): not numbers, left out of the checks.
    return pdfText(file).replace(/(?:\b[0-9a-f]{4}\b ?){4,}/g, ' ');
  };
  if (!HAS_POPPLER) return;
  for (const id of [demo.adjustedCheckId, demo.newestCheckId]) {
    texts[`certificate ${id}`] = await issue('certificate', id);
    texts[`check-sheet ${id}`] = await issue('sheet', id);
  }
});
afterAll(() => demo.lab.close());

describe.skipIf(!HAS_POPPLER)('numbers on the check-sheet and the certificate', () => {
  it('the patterns catch what they look for (so the checks below can fail)', () => {
    expect('u_c = 1.03e+5 Hz').toMatch(E_NOTATION);
    expect('chart 965.9499999999999').toMatch(FLOAT_NOISE);
    expect('0.30000000000000004').toMatch(FLOAT_NOISE);
    expect('9.300000 GHz').not.toMatch(FLOAT_NOISE);
  });

  it('no e-notation and no float noise anywhere in the text', () => {
    expect(Object.keys(texts)).toHaveLength(4);
    for (const [name, text] of Object.entries(texts)) {
      expect(text.length, name).toBeGreaterThan(1000);
      expect(E_NOTATION.exec(text)?.[0] ?? null, `${name}: e-notation`).toBeNull();
      expect(FLOAT_NOISE.exec(text)?.[0] ?? null, `${name}: float noise`).toBeNull();
    }
  });

  it('budgets in hertz with SI prefixes, α in ppm/K, U to two significant digits', () => {
    const sheet = texts[`check-sheet ${demo.adjustedCheckId}`] ?? '';
    expect(sheet).toMatch(/u_c = \d+(\.\d+)? [kM]?Hz,/);
    // U: two significant digits, then the same in ppm: "U = 41 kHz = 4.4 ppm".
    expect(sheet).toMatch(/U = (\d\.\d|[1-9]\d|[1-9]\d0) [kM]?Hz = (\d\.\d|[1-9]\d|\d\.\d\d) ppm/);
    expect(sheet).toMatch(/α = \d+(\.\d+)? ppm\/K \(u \d+(\.\d+)? ppm\/K\)/);
    expect(sheet).toMatch(/-?\d+(\.\d+)? [kMG]?Hz·K/);
    expect(sheet).not.toMatch(/\s\/K\b/);
  });

  it('the probability of conformity reads "> 99.9 %" rather than "100.00 %"', () => {
    for (const [name, text] of Object.entries(texts)) {
      expect(text, name).not.toMatch(/100\.0+ %/);
    }
    expect(texts[`check-sheet ${demo.newestCheckId}`]).toMatch(
      /probability of conformity (> 99\.9 %|\d+\.\d %|< 0\.1 %)/,
    );
  });

  it('the tolerance column says the stated tolerance (±1000 ppm of reading for WG-201), not 1001', () => {
    const cert = texts[`certificate ${demo.adjustedCheckId}`] ?? '';
    const meter = demo.lab.api;
    expect(meter).toBeDefined();
    expect(cert).not.toMatch(/\b100[1-9]\b/);
    expect(texts[`check-sheet ${demo.adjustedCheckId}`]).toMatch(/of reading\)/);
  });
});

describe('frequency columns show a correction that matters against U (GUM 7.2.6)', () => {
  it('a 1 MHz dial with U = 20 kHz prints to the kHz, so a 9 kHz correction shows', () => {
    const meter = { dialKind: 'direct' as const, resolution: 1e6 };
    // The dial alone would give 4 decimals in GHz (100 kHz): indication and corrected identical.
    expect(ghz(3.00045e9, 4)).toBe(ghz(3.00045e9 - 9e3, 4));
    const decimals = ghzDecimalsFor(meter, [20e3, 35e3]);
    expect(decimals).toBe(6);
    expect(ghz(3.00045e9, decimals)).toBe('3.000450');
    expect(ghz(3.00045e9 - 9e3, decimals)).toBe('3.000441');
  });

  it('never coarser than the dial, never finer than 1 Hz', () => {
    expect(ghzDecimalsFor({ dialKind: 'direct', resolution: 1e4 }, [5e6])).toBe(6);
    expect(ghzDecimalsFor({ dialKind: 'direct', resolution: 1e6 }, [0.01])).toBe(9);
    expect(ghzDecimalsFor({ dialKind: 'divisions', resolution: 0.01 }, [])).toBe(6);
  });
});
