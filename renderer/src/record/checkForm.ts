// The check being typed, as the form holds it, and its exchange document (dipledger.check/1):
// both ways, so a draft saved as a document reopens exactly as it was typed. Pure functions.
import type { Meter, Standard, StandardCertificate } from '../../../app/api/contract';
import type { Direction, Phase } from '../../../app/engine/model';

export interface FormPoint {
  phase: Phase;
  /** The reference frequency as typed, with unit ("9.3 GHz"). */
  reference: string;
  /** Asset id of the standard for this point; '' means the first one listed. */
  standard: string;
  up: string[];
  down: string[];
  dipDepthDb: string;
  /** Sweep method: the graduation the dial was set to, as typed (the column's unit left off)... */
  dialSetting?: string;
  /** ...and the trace swept across the dip there, as read from its file. */
  sweep?: { name: string; text: string; model?: 'auto' | 'complex' | 'magnitude' };
}

export interface CheckForm {
  meter: string;
  date: string;
  performer: string;
  standards: string[];
  method: 'tune-to-dip' | 'sweep';
  temperatureC: string;
  pressureHpa: string;
  humidityPct: string;
  adjusted: boolean;
  remarks: string;
  points: FormPoint[];
}

export const DEFAULT_READINGS_PER_DIRECTION = 2;

export function emptyForm(today: string): CheckForm {
  return {
    meter: '',
    date: today,
    performer: '',
    standards: [],
    method: 'tune-to-dip',
    temperatureC: '',
    pressureHpa: '',
    humidityPct: '',
    adjusted: false,
    remarks: '',
    points: [],
  };
}

/** A plan frequency as a technician writes it: "8.2 GHz", "26.5 GHz". */
export function planText(hz: number): string {
  return hz >= 1e9 ? `${Number((hz / 1e9).toFixed(6))} GHz` : `${Number((hz / 1e6).toFixed(3))} MHz`;
}

export function blankPoint(
  reference: string,
  phase: Phase = 'as-found',
  perDirection = DEFAULT_READINGS_PER_DIRECTION,
): FormPoint {
  return {
    phase,
    reference,
    standard: '',
    up: Array.from({ length: perDirection }, () => ''),
    down: Array.from({ length: perDirection }, () => ''),
    dipDepthDb: '',
  };
}

export function pointsFromPlan(meter: Meter, perDirection = DEFAULT_READINGS_PER_DIRECTION): FormPoint[] {
  return meter.planHz.map((hz) => blankPoint(planText(hz), 'as-found', perDirection));
}

/** The unit readings are typed in when the technician gives none. */
export function readingUnit(meter: Pick<Meter, 'dialKind'> | undefined): string {
  return meter?.dialKind === 'divisions' ? 'div' : 'GHz';
}

/** A reading as typed -> the document's value: the column's unit is added unless one was typed. */
export function readingValue(typed: string, unit: string): string {
  const t = typed.trim();
  if (t === '') return '';
  return /[a-z]/i.test(t) ? t : `${t} ${unit}`;
}

/** The document's value -> the text in the box: the column's unit is left off again. */
export function readingText(value: unknown, unit: string): string {
  if (typeof value === 'number') return String(value);
  if (typeof value !== 'string') return '';
  const suffix = ` ${unit}`;
  return value.endsWith(suffix) && !/[a-z]/i.test(value.slice(0, -suffix.length))
    ? value.slice(0, -suffix.length)
    : value;
}

/** A number typed in a box, kept as typed when it is not one so a draft loses nothing. */
function numberOrText(s: string): number | string | undefined {
  const t = s.trim();
  if (t === '') return undefined;
  const n = Number(t);
  return Number.isFinite(n) ? n : t;
}

function readingsOf(p: FormPoint, unit: string, keepEmpty: boolean) {
  const up: Direction = 'up';
  const down: Direction = 'down';
  const all = [
    ...p.up.map((v) => ({ value: readingValue(v, unit), direction: up })),
    ...p.down.map((v) => ({ value: readingValue(v, unit), direction: down })),
  ];
  return keepEmpty ? all : all.filter((r) => r.value !== '');
}

/**
 * The exchange document of the form. For a draft every box is kept (empty readings too); for
 * recording, empty readings are left out and the service judges what remains.
 */
export function toDocument(
  form: CheckForm,
  unit: string,
  purpose: 'draft' | 'record',
): Record<string, unknown> {
  const keep = purpose === 'draft';
  const conditions: Record<string, number | string> = {};
  for (const k of ['temperatureC', 'pressureHpa', 'humidityPct'] as const) {
    const v = numberOrText(form[k]);
    if (v !== undefined) conditions[k] = v;
  }
  return {
    format: 'dipledger.check/1',
    meter: form.meter,
    date: form.date,
    performer: form.performer,
    standards: form.standards,
    method: form.method,
    conditions,
    adjusted: form.adjusted,
    remarks: form.remarks,
    points: form.points.map((p) => {
      const dip = numberOrText(p.dipDepthDb);
      if (form.method === 'sweep') {
        // A swept point: the fitted resonance is the reference and the trace is the reading.
        return {
          phase: p.phase,
          ...(p.standard ? { standard: p.standard } : {}),
          dialSetting: readingValue(p.dialSetting ?? '', unit),
          ...(p.sweep ? { sweep: { ...p.sweep } } : {}),
          ...(dip !== undefined ? { dipDepthDb: dip } : {}),
          // A draft keeps the typed reference, should the method be switched back.
          ...(keep ? { reference: p.reference } : {}),
        };
      }
      return {
        phase: p.phase,
        reference: p.reference,
        ...(p.standard ? { standard: p.standard } : {}),
        readings: readingsOf(p, unit, keep),
        ...(dip !== undefined ? { dipDepthDb: dip } : {}),
      };
    }),
  };
}

const str = (v: unknown): string => (typeof v === 'string' ? v : typeof v === 'number' ? String(v) : '');

/** A saved draft back into the form; anything missing takes the empty form's value. */
export function fromDocument(doc: Record<string, unknown>, unit: string, today: string): CheckForm {
  const base = emptyForm(today);
  const c = (doc.conditions ?? {}) as Record<string, unknown>;
  const points = Array.isArray(doc.points) ? (doc.points as Record<string, unknown>[]) : [];
  return {
    meter: str(doc.meter),
    date: str(doc.date) || base.date,
    performer: str(doc.performer),
    standards: Array.isArray(doc.standards)
      ? doc.standards.filter((s): s is string => typeof s === 'string')
      : [],
    method: doc.method === 'sweep' ? 'sweep' : 'tune-to-dip',
    temperatureC: str(c.temperatureC),
    pressureHpa: str(c.pressureHpa),
    humidityPct: str(c.humidityPct),
    adjusted: doc.adjusted === true,
    remarks: str(doc.remarks),
    points: points.map((p) => {
      const readings = Array.isArray(p.readings) ? (p.readings as Record<string, unknown>[]) : [];
      const side = (d: Direction) =>
        readings.filter((r) => r.direction === d).map((r) => readingText(r.value, unit));
      return {
        phase: p.phase === 'as-left' ? 'as-left' : 'as-found',
        reference: str(p.reference),
        standard: str(p.standard),
        up: side('up'),
        down: side('down'),
        dipDepthDb: str(p.dipDepthDb),
        ...(p.dialSetting !== undefined ? { dialSetting: readingText(p.dialSetting, unit) } : {}),
        ...(sweepOf(p.sweep) ? { sweep: sweepOf(p.sweep) } : {}),
      };
    }),
  };
}

function sweepOf(v: unknown): FormPoint['sweep'] {
  if (typeof v !== 'object' || v === null) return undefined;
  const { name, text, model } = v as { name?: unknown; text?: unknown; model?: unknown };
  if (typeof text !== 'string') return undefined;
  return {
    name: typeof name === 'string' ? name : 'trace',
    text,
    ...(model === 'complex' || model === 'magnitude' ? { model } : {}),
  };
}

export interface Availability {
  available: boolean;
  certificate?: StandardCertificate;
  /** Why a standard cannot be used on the date, in words. */
  reason?: string;
}

/** Whether a standard had a certificate valid on the check date, and if not, why. */
export function availabilityOn(s: Standard, date: string): Availability {
  const valid = s.certificates.find((c) => c.calibratedOn <= date && date <= c.dueOn);
  if (valid) return { available: true, certificate: valid };
  const newest = s.certificates[0];
  if (!newest) return { available: false, reason: 'no certificate on record' };
  if (newest.dueOn < date)
    return { available: false, reason: `certificate ${newest.certificateId} expired on ${newest.dueOn}` };
  const oldest = s.certificates[s.certificates.length - 1] ?? newest;
  if (date < oldest.calibratedOn)
    return { available: false, reason: `not calibrated until ${oldest.calibratedOn}` };
  return { available: false, reason: `no certificate covers ${date}` };
}

/** What a point needs before it can be judged live: two readings and the three conditions. */
export function readyToJudge(form: CheckForm, p: FormPoint): boolean {
  const n = [...p.up, ...p.down].filter((v) => v.trim() !== '').length;
  const conditionsTyped = [form.temperatureC, form.pressureHpa, form.humidityPct].every(
    (v) => Number.isFinite(Number(v)) && v.trim() !== '',
  );
  return (
    n >= 2 &&
    conditionsTyped &&
    form.meter !== '' &&
    (p.standard !== '' || form.standards.length > 0) &&
    p.reference.trim() !== ''
  );
}

/** The budget document (dipledger.budget/1) that judges one point as typed. */
export function budgetDocument(form: CheckForm, p: FormPoint, unit: string): Record<string, unknown> {
  return {
    format: 'dipledger.budget/1',
    meter: form.meter,
    standard: p.standard || form.standards[0],
    conditions: {
      temperatureC: Number(form.temperatureC),
      pressureHpa: Number(form.pressureHpa),
      humidityPct: Number(form.humidityPct),
    },
    reference: p.reference,
    readings: readingsOf(p, unit, false),
  };
}

/** Any reading typed anywhere: then changing the meter keeps the points rather than replacing them. */
export function anyReadingTyped(form: CheckForm): boolean {
  return form.points.some((p) => [...p.up, ...p.down].some((v) => v.trim() !== ''));
}

/** What a swept point needs before it can be judged live: its trace, a dial setting, the three
 * conditions and a standard. */
export function sweptReadyToJudge(form: CheckForm, p: FormPoint): boolean {
  const conditionsTyped = [form.temperatureC, form.pressureHpa, form.humidityPct].every(
    (v) => Number.isFinite(Number(v)) && v.trim() !== '',
  );
  return (
    p.sweep !== undefined &&
    (p.dialSetting ?? '').trim() !== '' &&
    conditionsTyped &&
    form.meter !== '' &&
    (p.standard !== '' || form.standards.length > 0)
  );
}

/** The budget document (dipledger.budget/1) of a swept point: dial setting and trace. */
export function sweptBudgetDocument(form: CheckForm, p: FormPoint, unit: string): Record<string, unknown> {
  return {
    format: 'dipledger.budget/1',
    meter: form.meter,
    standard: p.standard || form.standards[0],
    conditions: {
      temperatureC: Number(form.temperatureC),
      pressureHpa: Number(form.pressureHpa),
      humidityPct: Number(form.humidityPct),
    },
    dialSetting: readingValue(p.dialSetting ?? '', unit),
    sweep: { name: p.sweep?.name, text: p.sweep?.text, model: p.sweep?.model },
  };
}
