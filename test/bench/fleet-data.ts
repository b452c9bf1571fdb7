// A synthetic fleet for the fleet benchmark: meters, standards and people made through the LabApi,
// and 25 years of yearly checks (11 points, 4 readings each) as history CSV, one batch of meters at
// a time so no single CSV text holds the whole fleet. Deterministic: one seeded stream per meter.
// The numbers only need to look like a fleet (drift, the odd step, fading dips, adjustments);
// they are not a physical simulation (sample-lab/generate.ts is).
import type { LabApi } from '../../app/api/contract';
import { CSV_COLUMNS } from '../../app/api/service';
import type { MeterInput } from '../../app/api/schemas';
import { fnv1a, mulberry32 } from '../../sample-lab/generate';

export const YEARS = 25;
export const POINTS = 11;
export const READINGS = 4;
/** The last year of checks; the fixture clock (test/fixtures/lab.ts) is 2026-12-01. */
const LAST_YEAR = 2026;
const FIRST_YEAR = LAST_YEAR - YEARS + 1;
const PEOPLE = ['Ines Marlow', 'Tobin Achterberg', 'Rhea Dunmore', 'Oskar Veldt', 'Priya Halloran'];
const STANDARDS = ['SYN-1', 'SYN-2', 'SYN-3'];

/** Waveguide and coaxial bands of the invented fleet: [min GHz, max GHz, construction, port]. */
const BANDS: [number, number, MeterInput['construction'], string][] = [
  [2, 4, 'coaxial', 'N female'],
  [3.95, 5.85, 'waveguide', 'WR-187'],
  [8.2, 12.4, 'waveguide', 'WR-90'],
  [12.4, 18, 'waveguide', 'WR-62'],
  [18, 26.5, 'waveguide', 'WR-42'],
  [26.5, 40, 'waveguide', 'WR-28'],
  [50, 75, 'waveguide', 'WR-15'],
];

export function assetIdOf(i: number): string {
  return `FL-${String(i + 1).padStart(5, '0')}`;
}

interface FleetMeter {
  input: MeterInput;
  planHz: number[];
  /** Divisions meters: frequency = a + b * divisions (a straight chart). */
  chart: { a: number; b: number } | null;
}

function meterOf(i: number): FleetMeter {
  const rnd = mulberry32(fnv1a(assetIdOf(i)));
  const [lo, hi, construction, port] = BANDS[i % BANDS.length] as (typeof BANDS)[number];
  const minHz = lo * 1e9;
  const maxHz = hi * 1e9;
  const planHz = Array.from(
    { length: POINTS },
    (_, k) => Math.round((minHz + ((maxHz - minHz) * (k + 0.5)) / POINTS) / 1e6) * 1e6,
  );
  // One meter in five reads a micrometer in divisions through a chart.
  const divisions = construction === 'coaxial' || rnd() < 0.2;
  const base: MeterInput = {
    assetId: assetIdOf(i),
    description: `Synthetic ${construction} meter ${lo}-${hi} GHz`,
    construction,
    port,
    min: `${lo} GHz`,
    max: `${hi} GHz`,
    dialKind: divisions ? 'divisions' : 'direct',
    accuracyRelPpm: 1000,
    resolution: divisions ? 0.01 : hi < 18 ? '0.5 MHz' : '2 MHz',
    alphaPerK: 17e-6 + rnd() * 6e-6,
    loadedQ: 1500 + Math.round(rnd() * 2000),
    minDipDb: 1,
    intervalMonths: 12,
    plan: planHz.map((f) => `${f} Hz`),
    location: `Store ${1 + (i % 12)}`,
  };
  if (!divisions) return { input: base, planHz, chart: null };
  // Frequency falls with divisions across 0..25 div.
  const b = -(maxHz - minHz) / 25;
  const a = maxHz;
  return {
    input: {
      ...base,
      chart: [0, 5, 10, 15, 20, 25].map((d) => ({ divisions: d, frequency: `${a + b * d} Hz` })),
    },
    planHz,
    chart: { a, b },
  };
}

/** Meters, standards and people, through the API (the same validation a user's input gets). */
export async function createFleet(api: LabApi, meters: number): Promise<void> {
  await api.updateLab({ name: 'Synthetic fleet laboratory' });
  for (const name of PEOPLE) await api.createPerson({ name, role: 'technician' });
  for (const assetId of STANDARDS) {
    await api.createStandard({
      assetId,
      description: 'Synthesized source (synthetic fleet)',
      certificates: Array.from({ length: YEARS + 1 }, (_, k) => ({
        certificateId: `${assetId}-${FIRST_YEAR - 1 + k}`,
        issuedBy: 'Invented calibration body',
        calibratedOn: `${FIRST_YEAR - 1 + k}-01-01`,
        dueOn: `${FIRST_YEAR + k}-01-10`,
        expandedUncertaintyPpm: 0.01,
      })),
    });
  }
  for (let i = 0; i < meters; i++) await api.createMeter(meterOf(i).input);
}

const CSV_HEADER = CSV_COLUMNS.join(',');

/** The history CSV of meters [from, to): 25 yearly checks each. */
export function historyCsv(from: number, to: number): { csv: string; checks: number; points: number } {
  const lines: string[] = [CSV_HEADER];
  let checks = 0;
  let points = 0;
  for (let i = from; i < to; i++) {
    const m = meterOf(i);
    const rnd = mulberry32(fnv1a(`${assetIdOf(i)}/history`));
    const gauss = () => {
      const u = Math.max(rnd(), 1e-12);
      return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * rnd());
    };
    const month = 1 + Math.floor(rnd() * 11);
    const day = 1 + Math.floor(rnd() * 28);
    let offsetPpm = gauss() * 100;
    const driftPpmPerYear = gauss() * 12;
    // About one meter in twelve takes a knock in some year; one in ten is adjusted once.
    const stepYear = rnd() < 0.08 ? FIRST_YEAR + 3 + Math.floor(rnd() * (YEARS - 3)) : -1;
    const adjustYear = rnd() < 0.1 ? FIRST_YEAR + 5 + Math.floor(rnd() * (YEARS - 5)) : -1;
    const dipStartDb = 2 + rnd() * 2;
    const dipFadeDbPerYear = rnd() < 0.15 ? 0.04 + rnd() * 0.06 : rnd() * 0.01;
    const resolutionHz = m.input.dialKind === 'direct' ? ((m.planHz[0] as number) < 18e9 ? 0.5e6 : 2e6) : 0;
    for (let y = FIRST_YEAR; y <= LAST_YEAR; y++) {
      if (y === stepYear) offsetPpm += 400 + gauss() * 50;
      const date = `${y}-${String(month).padStart(2, '0')}-${String(day).padStart(2, '0')}`;
      const adjusted = y === adjustYear;
      const t = y - FIRST_YEAR;
      const temperatureC = (21 + gauss() * 0.8).toFixed(1);
      const pressureHpa = (1010 + gauss() * 8).toFixed(1);
      const humidityPct = (45 + gauss() * 6).toFixed(0);
      const performer = PEOPLE[Math.floor(rnd() * PEOPLE.length)] as string;
      const standard = STANDARDS[(i + y) % STANDARDS.length] as string;
      const phases: ('as-found' | 'as-left')[] = adjusted ? ['as-found', 'as-left'] : ['as-found'];
      let seq = 0;
      for (const phase of phases) {
        const errPpm = phase === 'as-left' ? gauss() * 20 : offsetPpm + driftPpmPerYear * t;
        for (const refHz of m.planHz) {
          seq++;
          const dip = Math.max(0.3, dipStartDb - dipFadeDbPerYear * t + gauss() * 0.05).toFixed(2);
          for (let r = 0; r < READINGS; r++) {
            const readHz = refHz * (1 + (errPpm + gauss() * 15) * 1e-6);
            const direction = r < READINGS / 2 ? 'up' : 'down';
            let reading: string;
            if (m.chart) reading = ((readHz - m.chart.a) / m.chart.b).toFixed(2);
            else reading = String(Math.round(readHz / resolutionHz) * resolutionHz);
            lines.push(
              [
                m.input.assetId,
                date,
                performer,
                standard,
                'tune-to-dip',
                temperatureC,
                '',
                pressureHpa,
                '',
                humidityPct,
                '',
                adjusted ? 'yes' : 'no',
                seq,
                phase,
                refHz,
                standard,
                reading,
                m.chart ? 'div' : 'Hz',
                direction,
                phase === 'as-found' ? dip : '',
                '',
              ].join(','),
            );
          }
          points++;
        }
      }
      // After an adjustment the meter starts again near zero error and keeps drifting.
      if (adjusted) offsetPpm = -driftPpmPerYear * t + gauss() * 20;
      checks++;
    }
  }
  return { csv: lines.join('\r\n'), checks, points };
}
