// Sweeps of check points (migration 0003): the dial graduation set, the raw trace and the fitted
// resonance, one row per point measured by the sweep method. Traces are stored as float64 blobs
// (exact, and a third of the size of JSON text for a 10,001-point trace).
import type { ResonanceReport } from '../../app/engine/resonance';
import { decodeStoredJson as decodeJson, encodeJson } from '../codec/stored-json';
import type { LabDb } from '../store';

export type SweepSourceKind = 'touchstone' | 'delimited' | 'typed';
export type SweepLevelKind = 'touchstone' | 'db' | 'linear' | 'volts' | 'ri';

export interface SweepData {
  dialSetting: number;
  sourceName: string;
  sourceKind: SweepSourceKind;
  levelKind: SweepLevelKind;
  frequencyHz: number[];
  /** Linear power (scalar) or real part (complex). */
  level: number[];
  /** Imaginary part of a complex trace, else null. */
  imag: number[] | null;
  fit: ResonanceReport;
}

export interface SweepRecord extends SweepData {
  checkId: number;
  revision: number;
  seq: number;
}

export interface SweepSummary {
  checkId: number;
  revision: number;
  date: string;
  seq: number;
  phase: 'as-found' | 'as-left';
  dialSetting: number;
  f0Hz: number;
  f0UncertaintyHz: number;
  loadedQ: number;
  depthDb: number;
  spuriousCount: number;
  /** Where the spurious dips were, Hz. */
  spuriousHz: number[];
}

interface SweepRow {
  point_id: number;
  dial_setting: number;
  source_name: string;
  source_kind: SweepSourceKind;
  level_kind: SweepLevelKind;
  point_count: number;
  trace: Buffer;
  complex: number;
  method: string;
  f0_hz: number;
  u_f0_hz: number;
  loaded_q: number;
  u_loaded_q: number;
  depth_db: number;
  spurious_count: number;
  fit_json: string;
}

function traceToBlob(s: SweepData): Buffer {
  const n = s.frequencyHz.length;
  const columns = s.imag ? 3 : 2;
  const values = new Float64Array(n * columns);
  values.set(s.frequencyHz, 0);
  values.set(s.level, n);
  if (s.imag) values.set(s.imag, 2 * n);
  // Float64Array is little-endian on every platform Node and Electron run on; checked on read.
  return Buffer.from(values.buffer);
}

function blobToColumns(blob: Buffer, n: number, complex: boolean): [number[], number[], number[] | null] {
  const columns = complex ? 3 : 2;
  if (blob.byteLength !== n * columns * 8)
    throw new Error(`sweep trace blob has ${blob.byteLength} bytes, expected ${n * columns * 8}`);
  const values = new Float64Array(blob.buffer.slice(blob.byteOffset, blob.byteOffset + blob.byteLength));
  const col = (k: number) => Array.from(values.subarray(k * n, (k + 1) * n));
  return [col(0), col(1), complex ? col(2) : null];
}

function sweepToRow(pointId: number, s: SweepData): Omit<SweepRow, 'trace'> & { trace: Buffer } {
  const m = s.fit.main;
  return {
    point_id: pointId,
    dial_setting: s.dialSetting,
    source_name: s.sourceName,
    source_kind: s.sourceKind,
    level_kind: s.levelKind,
    point_count: s.frequencyHz.length,
    trace: traceToBlob(s),
    complex: s.imag ? 1 : 0,
    method: m.method,
    f0_hz: m.f0Hz,
    u_f0_hz: m.f0UncertaintyHz,
    loaded_q: m.loadedQ,
    u_loaded_q: m.loadedQUncertainty,
    depth_db: m.depthDb,
    spurious_count: s.fit.spurious.length,
    fit_json: encodeJson(s.fit),
  };
}

function rowToSweep(r: SweepRow): SweepData {
  const [frequencyHz, level, imag] = blobToColumns(r.trace, r.point_count, r.complex === 1);
  return {
    dialSetting: r.dial_setting,
    sourceName: r.source_name,
    sourceKind: r.source_kind,
    levelKind: r.level_kind,
    frequencyHz,
    level,
    imag,
    fit: decodeJson(r.fit_json) as ResonanceReport,
  };
}

/** Writes the sweeps of the newest revision of a check, by point number. Call inside the
 * transaction that wrote the points. */
export function insertSweeps(db: LabDb, checkId: number, sweeps: { seq: number; sweep: SweepData }[]): void {
  if (sweeps.length === 0) return;
  const pointOf = db.prepare(
    `SELECT cp.id FROM check_point cp JOIN check_revision cr ON cr.id = cp.revision_id
     WHERE cr.check_id = ? AND cp.seq = ? ORDER BY cr.revision DESC LIMIT 1`,
  );
  const insert = db.prepare(
    `INSERT INTO sweep (point_id, dial_setting, source_name, source_kind, level_kind, point_count, trace, complex,
       method, f0_hz, u_f0_hz, loaded_q, u_loaded_q, depth_db, spurious_count, fit_json)
     VALUES (@point_id, @dial_setting, @source_name, @source_kind, @level_kind, @point_count, @trace, @complex,
       @method, @f0_hz, @u_f0_hz, @loaded_q, @u_loaded_q, @depth_db, @spurious_count, @fit_json)`,
  );
  for (const { seq, sweep } of sweeps) {
    const point = pointOf.get(checkId, seq) as { id: number } | undefined;
    if (!point) throw new Error(`sweep: no point ${seq} in check ${checkId}`);
    const changed = insert.run(sweepToRow(point.id, sweep)).changes;
    if (changed !== 1) throw new Error(`sweep: point ${seq} of check ${checkId} was not written`);
  }
}

/** The sweeps of the newest revision of a check, by point number. */
export function getSweepsOfCheck(db: LabDb, checkId: number): SweepRecord[] {
  const rows = db
    .prepare(
      `SELECT s.*, cp.seq, cr.revision FROM sweep s JOIN check_point cp ON cp.id = s.point_id
       JOIN check_revision cr ON cr.id = cp.revision_id
       WHERE cr.check_id = ? AND cr.revision = (SELECT max(x.revision) FROM check_revision x WHERE x.check_id = ?)
       ORDER BY cp.seq`,
    )
    .all(checkId, checkId) as (SweepRow & { seq: number; revision: number })[];
  return rows.map((r) => ({ ...rowToSweep(r), checkId, revision: r.revision, seq: r.seq }));
}

/** Every swept point of a meter (newest revision of each check), oldest first: the history of
 * its resonance, Q, depth and spurious responses. */
export function listSweepSummaries(db: LabDb, meterId: number): SweepSummary[] {
  const rows = db
    .prepare(
      `SELECT cr.check_id, cr.revision, cr.performed_on, cp.seq, cp.phase, s.dial_setting, s.f0_hz, s.u_f0_hz,
              s.loaded_q, s.depth_db, s.spurious_count, s.fit_json
       FROM sweep s JOIN check_point cp ON cp.id = s.point_id JOIN check_revision cr ON cr.id = cp.revision_id
       JOIN check_event ce ON ce.id = cr.check_id
       WHERE ce.meter_id = ? AND cr.revision = (SELECT max(x.revision) FROM check_revision x WHERE x.check_id = cr.check_id)
       ORDER BY cr.performed_on, cr.check_id, cp.seq`,
    )
    .all(meterId) as {
    check_id: number;
    revision: number;
    performed_on: string;
    seq: number;
    phase: 'as-found' | 'as-left';
    dial_setting: number;
    f0_hz: number;
    u_f0_hz: number;
    loaded_q: number;
    depth_db: number;
    spurious_count: number;
    fit_json: string;
  }[];
  return rows.map((r) => ({
    checkId: r.check_id,
    revision: r.revision,
    date: r.performed_on,
    seq: r.seq,
    phase: r.phase,
    dialSetting: r.dial_setting,
    f0Hz: r.f0_hz,
    f0UncertaintyHz: r.u_f0_hz,
    loadedQ: r.loaded_q,
    depthDb: r.depth_db,
    spuriousCount: r.spurious_count,
    spuriousHz: (decodeJson(r.fit_json) as ResonanceReport).spurious.map((s) => s.f0Hz),
  }));
}
