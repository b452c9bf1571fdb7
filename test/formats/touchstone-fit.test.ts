// Touchstone files as a network analyser writes them, read and fitted: Version 1.x and 2.0 in RI,
// MA and DB, one-port and two-port (both [Two-Port Data Order]s of 2.0), each within its stated
// uncertainty of the invented truth or refused with a reason; and the two traces that once gave a
// silently wrong answer: a 2.0 RI trace with a cable delay, and a 1.x DB file whose angle column
// carries no resonance. File layout: IBIS Open Forum, "Touchstone File Format Specification",
// Version 2.0 (2009), sections on the option line, [Two-Port Data Order] and [Network Data].
import { describe, expect, it } from 'vitest';
import { fitResonances } from '../../app/engine/resonance';
import { readSweepFile } from '../../app/formats/sweep-file';
import { complexSweep, type ComplexSweep } from '../fixtures/sweeps';

type Format = 'RI' | 'MA' | 'DB';

function pair(format: Format, re: number, im: number): string {
  if (format === 'RI') return `${re.toPrecision(10)} ${im.toPrecision(10)}`;
  const mag = Math.hypot(re, im);
  const ang = ((Math.atan2(im, re) * 180) / Math.PI).toPrecision(10);
  return `${format === 'DB' ? (20 * Math.log10(mag)).toPrecision(10) : mag.toPrecision(10)} ${ang}`;
}

/** A file of the sweep as S21 (two-port; S11 = S22 = 0.1, S12 = S21) or S11 (one-port). */
function touchstone(
  s: ComplexSweep,
  version: '1' | '2',
  format: Format,
  ports: 1 | 2,
  order: '12_21' | '21_12' = '21_12',
): string {
  const lines: string[] = ['! invented sweep of an absorption meter', `# GHz S ${format} R 50`];
  if (version === '2') {
    lines.unshift('[Version] 2.0');
    lines.push(`[Number of Ports] ${ports}`);
    if (ports === 2) lines.push(`[Two-Port Data Order] ${order}`);
    lines.push(`[Number of Frequencies] ${s.frequencyHz.length}`, '[Network Data]');
  }
  s.frequencyHz.forEach((f, i) => {
    const s21 = pair(format, s.re[i] as number, s.im[i] as number);
    const refl = pair(format, 0.1, 0);
    const ghz = (f / 1e9).toPrecision(12);
    if (ports === 1) lines.push(`${ghz} ${s21}`);
    else if (version === '2' && order === '12_21') lines.push(`${ghz} ${refl} ${s21} ${s21} ${refl}`);
    else lines.push(`${ghz} ${refl} ${s21} ${s21} ${refl}`);
  });
  if (version === '2') lines.push('[End]');
  return lines.join('\n');
}

const F0 = 9.375e9;

describe('Touchstone 1.x and 2.0 in RI, MA and DB, one- and two-port', () => {
  const QL = 2200;
  const w = F0 / QL;
  const truth = { f0Hz: F0 + 0.2 * w, loadedQ: QL };
  const sweep = complexSweep([{ ...truth, depthDb: 2, rotationRad: 0.15 }], {
    startHz: F0 - 6 * w,
    stopHz: F0 + 6 * w,
    points: 401,
    seed: 11,
    delayS: 3e-9,
    noise: 1e-3,
  });
  for (const version of ['1', '2'] as const)
    for (const format of ['RI', 'MA', 'DB'] as const)
      for (const [ports, order] of [
        [1, undefined],
        [2, '21_12'],
        [2, '12_21'],
      ] as const) {
        if (version === '1' && order === '12_21') continue;
        it(`${version === '2' ? '2.0' : '1.x'} ${format} ${ports}-port${order ? ` ${order}` : ''}: within 4 u of the truth`, () => {
          const text = touchstone(sweep, version, format, ports, order);
          const read = readSweepFile(text, `trace.s${ports}p`);
          if (!read.ok) throw new Error(read.message);
          const r = fitResonances(read.value.trace);
          expect(r.judgement?.ok).toBe(true);
          expect(r.model?.used).toBe('complex');
          expect(Math.abs(r.main.f0Hz - truth.f0Hz)).toBeLessThan(4 * r.main.f0UncertaintyHz);
          expect(Math.abs(r.main.loadedQ - QL)).toBeLessThan(4 * r.main.loadedQUncertainty);
        });
      }
});

describe('the two traces that gave a silently wrong answer', () => {
  it('2.0 RI with a cable delay turning the phase by about 150 degrees: QL 2200 within its uncertainty', () => {
    const QL = 2200;
    const w = F0 / QL;
    // 12 linewidths of 4.26 MHz: 51 MHz; 8 ns turns the phase by 147 degrees across it.
    const s = complexSweep([{ f0Hz: F0, loadedQ: QL, depthDb: 1.5 }], {
      startHz: F0 - 6 * w,
      stopHz: F0 + 6 * w,
      points: 401,
      seed: 21,
      delayS: 8e-9,
      noise: 1e-3,
    });
    const read = readSweepFile(touchstone(s, '2', 'RI', 2), 'delay.s2p');
    if (!read.ok) throw new Error(read.message);
    const r = fitResonances(read.value.trace);
    expect(r.judgement?.ok).toBe(true);
    expect(Math.abs(r.main.loadedQ / QL - 1)).toBeLessThan(0.003);
    expect(Math.abs(r.main.loadedQ - QL)).toBeLessThan(4 * r.main.loadedQUncertainty);
    expect(Math.abs(r.main.f0Hz - F0)).toBeLessThan(4 * r.main.f0UncertaintyHz);
    expect(r.notes.join(' ')).toMatch(/electrical delay/);
  });

  it('1.x DB with a constant angle column: the magnitude model, 1.5 dB and QL 1500', () => {
    const QL = 1500;
    const w = F0 / QL;
    const s = complexSweep([{ f0Hz: F0, loadedQ: QL, depthDb: 1.5 }], {
      startHz: F0 - 6 * w,
      stopHz: F0 + 6 * w,
      points: 401,
      seed: 22,
      noise: 1e-3,
      constantPhase: true,
    });
    const read = readSweepFile(touchstone(s, '1', 'DB', 2), 'flat.s2p');
    if (!read.ok) throw new Error(read.message);
    const r = fitResonances(read.value.trace);
    expect(r.model?.used).toBe('magnitude');
    expect(r.model?.reason).toMatch(/phase carries no resonance/);
    expect(r.judgement?.ok).toBe(true);
    expect(Math.abs(r.main.depthDb - 1.5)).toBeLessThan(0.05);
    expect(Math.abs(r.main.loadedQ / QL - 1)).toBeLessThan(0.003 + 4 * (r.main.loadedQUncertainty / QL));
  });
});
