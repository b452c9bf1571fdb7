// Touchstone and delimited trace readers. Files are written in the form of the examples of the
// IBIS "Touchstone File Format Specification" Version 2.0 (Version 1.x and 2.0 examples, from
// memory): option line, comments, DB/MA/RI, 2-port order, keywords. Every malformed file is
// answered with its line and what was wrong, never a crash.
import { describe, expect, it } from 'vitest';
import { readTouchstone } from '../../app/formats/touchstone';
import { readDelimitedTrace } from '../../app/formats/trace-csv';
import { readSweepFile } from '../../app/formats/sweep-file';

const V1_S1P = `!1-port S-parameter file, single frequency point
# MHz S MA R 50
!freq magS11 angS11
2.000 0.894 -12.136
`;

const V1_S2P = `!2-port S-parameter file, three frequency points
# GHz S RI R 50.0
!freq ReS11 ImS11 ReS21 ImS21 ReS12 ImS12 ReS22 ImS22
1.0000 0.3926 -0.1211 -0.0003 -0.0021 -0.0003 -0.0021 0.3926 -0.1211
2.0000 0.3517 -0.3054 -0.0096 -0.0298 -0.0096 -0.0298 0.3517 -0.3054
10.000 0.3419 0.3336 -0.0134 0.0379 -0.0134 0.0379 0.3419 0.3336
`;

const V2_12_21 = `[Version] 2.0
# GHz S DB R 50
[Number of Ports] 2
[Two-Port Data Order] 12_21
[Number of Frequencies] 2
[Network Data]
1.0 -20 10  -40 20   -3 30   -25 40 ! S11 S12 S21 S22
2.0 -21 11  -41 21
    -4 31   -26 41
[End]
`;

describe('readTouchstone', () => {
  it('reads a Version 1.x one-port (MHz, MA): S11 as real and imaginary', () => {
    const r = readTouchstone(V1_S1P, 'meter.s1p');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value.ports).toBe(1);
    expect(r.value.frequencyHz).toEqual([2e6]);
    expect(r.value.response.name).toBe('S11');
    const rad = (-12.136 * Math.PI) / 180;
    expect(r.value.response.re[0]).toBeCloseTo(0.894 * Math.cos(rad), 12);
    expect(r.value.response.im[0]).toBeCloseTo(0.894 * Math.sin(rad), 12);
  });

  it('reads a Version 1.x two-port (GHz, RI) in the order N11 N21 N12 N22: S21 is the second pair', () => {
    const r = readTouchstone(V1_S2P, 'meter.s2p');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value.frequencyHz).toEqual([1e9, 2e9, 10e9]);
    expect(r.value.response.name).toBe('S21');
    expect(r.value.response.re).toEqual([-0.0003, -0.0096, -0.0134]);
    expect(r.value.response.im).toEqual([-0.0021, -0.0298, 0.0379]);
    expect(r.value.referenceOhms).toEqual([50, 50]);
  });

  it('reads Version 2.0 with [Two-Port Data Order] 12_21, a point spanning lines, DB format', () => {
    const r = readTouchstone(V2_12_21, 'meter.s2p');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value.version).toBe('2');
    // 12_21: N11 N12 N21 N22, so S21 is the third pair: -3 dB at 30 degrees, then -4 dB at 31.
    const mag = Math.hypot(r.value.response.re[0] as number, r.value.response.im[0] as number);
    expect(20 * Math.log10(mag)).toBeCloseTo(-3, 12);
    expect(
      (Math.atan2(r.value.response.im[1] as number, r.value.response.re[1] as number) * 180) / Math.PI,
    ).toBeCloseTo(31, 10);
    // The same file with 21_12 reads the second pair instead.
    const swapped = readTouchstone(V2_12_21.replace('12_21', '21_12'), 'meter.s2p');
    expect(
      swapped.ok &&
        20 *
          Math.log10(
            Math.hypot(swapped.value.response.re[0] as number, swapped.value.response.im[0] as number),
          ),
    ).toBeCloseTo(-40, 10);
  });

  it('takes the option-line defaults (GHz, S, MA, R 50) and reads the port count from the data without a .sNp name', () => {
    const r = readTouchstone('#\n1 0.5 90\n2 0.25 180\n', 'trace.dat');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value.frequencyHz).toEqual([1e9, 2e9]);
    expect(r.value.response.im[0]).toBeCloseTo(0.5, 12);
    expect(r.value.format).toBe('MA');
  });

  it('stops at Version 1.x two-port noise data, where the frequency falls', () => {
    const r = readTouchstone(`${V1_S2P}4 0.5 0.3 120 0.4\n6 0.6 0.3 130 0.4\n`, 'meter.s2p');
    expect(r.ok && r.value.frequencyHz.length).toBe(3);
  });

  const malformed: [string, string, string, RegExp][] = [
    [
      'a truncated line',
      V1_S2P.replace('2.0000 0.3517 -0.3054 -0.0096 -0.0298', '2.0000 0.3517 -0.3054 -0.0096 -0.0298 !'),
      'meter.s2p',
      /^line 5: truncated/,
    ],
    [
      'a text value',
      V1_S2P.replace('-0.0298 0.3517', 'n/a 0.3517'),
      'meter.s2p',
      /^line 5: "n\/a" is not a number/,
    ],
    [
      'a missing option line',
      V1_S2P.replace('# GHz S RI R 50.0\n', ''),
      'meter.s2p',
      /^line 3: data before the option line/,
    ],
    [
      'decreasing frequencies',
      V1_S2P.replace('10.000 0.3419', '1.5000 0.3419'),
      'meter.s2p',
      /^line 6: frequency 1.5 GHz does not rise/,
    ],
    ['an empty file', '', 'meter.s2p', /^the file is empty/],
    ['only comments', '! nothing here\n!\n', 'meter.s1p', /^the file is empty/],
    ['a bad option', '# GHz S XY R 50\n1 0.5 0\n', 'meter.s1p', /^line 1: option line: "XY"/],
    [
      'a two-port 2.0 file without its data order',
      V2_12_21.replace('[Two-Port Data Order] 12_21\n', ''),
      'x.s2p',
      /^line 5: \[Two-Port Data Order\]/,
    ],
    ['a 2.0 file without [End]', V2_12_21.replace('[End]\n', ''), 'x.s2p', /ends without \[End\]/],
    ['a 2.0 point cut short', V2_12_21.replace('    -4 31   -26 41\n', ''), 'x.s2p', /^line 8: truncated/],
    [
      'a wrong frequency count',
      V2_12_21.replace('[Number of Frequencies] 2', '[Number of Frequencies] 3'),
      'x.s2p',
      /says 3, the file has 2/,
    ],
    ['a four-port file', '# GHz S RI\n1 0 0\n', 'x.s4p', /only \.s1p and \.s2p/],
  ];
  it.each(malformed)('%s: refused with the line and what was wrong', (_what, text, name, message) => {
    const r = readTouchstone(text, name);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.message).toMatch(message);
  });
});

describe('readDelimitedTrace', () => {
  it('reads dB levels with the frequency unit from the header', () => {
    const r = readDelimitedTrace('frequency_GHz,level_dB\n9.30,-3\n9.31,-13\n');
    expect(r.ok && r.value.frequencyHz).toEqual([9.3e9, 9.31e9]);
    expect(r.ok && r.value.power[1]).toBeCloseTo(10 ** -1.3, 15);
  });

  it('reads a negative-going detector in volts with its sign and offset', () => {
    const r = readDelimitedTrace('freq_MHz; detector_mV\n9300; -105\n9301; -55\n', {
      detectorSign: -1,
      detectorOffsetV: -0.005,
    });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value.level).toBe('volts');
    expect(r.value.power[0]).toBeCloseTo(0.1, 12);
    expect(r.value.power[1]).toBeCloseTo(0.05, 12);
    const wrongSign = readDelimitedTrace('freq_MHz; detector_mV\n9300; -105\n');
    expect(!wrongSign.ok && wrongSign.message).toMatch(/^line 2: .*negative-going detector needs sign -1/);
  });

  it('reads bare frequencies as Hz from 1e8 up and refuses smaller bare numbers', () => {
    expect(readDelimitedTrace('9.3e9 1e-3\n9.4e9 2e-3\n', { level: 'linear' }).ok).toBe(true);
    const r = readDelimitedTrace('9.3 -3\n9.4 -3\n');
    expect(!r.ok && r.message).toMatch(/^line 1: frequency 9.3 has no unit/);
  });

  it.each([
    ['a truncated line', 'f_GHz,dB\n9.3,-1\n9.4\n', /^line 3: truncated/],
    ['a text value', 'f_GHz,dB\n9.3,-1\n9.4,low\n', /^line 3: "low" is not a number/],
    ['decreasing frequencies', 'f_GHz,dB\n9.3,-1\n9.2,-1\n', /^line 3: frequency 9.2 does not rise/],
    ['an empty file', '\n\n', /^the file is empty/],
    ['a header only', 'f_GHz,dB\n', /^line 1: a header but no data/],
  ])('%s: refused with the line', (_what, text, message) => {
    const r = readDelimitedTrace(text);
    expect(!r.ok && r.message).toMatch(message);
  });
});

describe('readSweepFile', () => {
  it('picks the reader by name or first line, and refuses non-S parameters', () => {
    expect(readSweepFile(V1_S2P, 'a.s2p').ok && 'touchstone').toBe('touchstone');
    const byContent = readSweepFile(V1_S1P, 'export');
    expect(byContent.ok && byContent.value.source).toBe('touchstone');
    const z = readSweepFile(V1_S1P.replace('S MA', 'Z MA'), 'a.s1p');
    expect(!z.ok && z.message).toMatch(/Z-parameters/);
    const csv = readSweepFile('f_GHz,dB\n9.3,-1\n', 'a.csv');
    expect(csv.ok && csv.value.trace.kind).toBe('scalar');
  });
});

describe('readDelimitedTrace with more than two unnamed columns', () => {
  it('asks what the columns hold instead of guessing (Re/Im and dB/angle look alike)', () => {
    const text = '6.0721 0.95 -0.10\n6.0722 0.90 -0.20\n6.0723 0.95 -0.10\n';
    const r = readDelimitedTrace(text);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.line).toBe(1);
      expect(r.message).toMatch(/no header saying what they hold/);
    }
    const ri = readDelimitedTrace(text, { level: 'ri', frequencyUnit: 'GHz' });
    expect(ri.ok).toBe(true);
    if (ri.ok) expect(ri.value.re).toEqual([0.95, 0.9, 0.95]);
  });
});
