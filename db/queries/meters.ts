// Meters, their dial charts and check plans, and the register's one-query summary.
import type { Meter } from '../../app/model/records';
import type { Verdict } from '../../app/engine/model';
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';

interface MeterRow {
  id: number;
  asset_id: string;
  description: string;
  construction: Meter['construction'];
  port: string;
  min_hz: number;
  max_hz: number;
  dial_kind: Meter['dialKind'];
  accuracy_rel_ppm: number;
  accuracy_abs_hz: number;
  resolution: number;
  alpha_per_k: number;
  u_alpha_per_k: number;
  ref_temperature_c: number;
  ref_pressure_hpa: number;
  ref_humidity_pct: number;
  loaded_q: number;
  setting_fraction: number;
  min_dip_db: number;
  max_input_power_w: number;
  location: string;
  state: Meter['state'];
  interval_months: number;
}

export interface MeterRecord {
  id: number;
  meter: Meter;
}

function rowToMeter(db: LabDb, r: MeterRow): Meter {
  const chart = cachedStatement(
    db,
    'SELECT divisions, frequency_hz FROM meter_chart_point WHERE meter_id = ? ORDER BY divisions',
  ).all(r.id) as { divisions: number; frequency_hz: number }[];
  const plan = cachedStatement(
    db,
    'SELECT frequency_hz FROM meter_plan_point WHERE meter_id = ? ORDER BY frequency_hz',
  ).all(r.id) as { frequency_hz: number }[];
  return {
    assetId: r.asset_id,
    description: r.description,
    construction: r.construction,
    port: r.port,
    minHz: r.min_hz,
    maxHz: r.max_hz,
    dialKind: r.dial_kind,
    accuracyRelPpm: r.accuracy_rel_ppm,
    accuracyAbsHz: r.accuracy_abs_hz,
    resolution: r.resolution,
    chart: chart.map((c) => ({ divisions: c.divisions, frequencyHz: c.frequency_hz })),
    alphaPerK: r.alpha_per_k,
    alphaUncertaintyPerK: r.u_alpha_per_k,
    reference: {
      temperatureC: r.ref_temperature_c,
      pressureHpa: r.ref_pressure_hpa,
      humidityPct: r.ref_humidity_pct,
    },
    loadedQ: r.loaded_q,
    settingFraction: r.setting_fraction,
    minDipDb: r.min_dip_db,
    maxInputPowerW: r.max_input_power_w,
    location: r.location,
    state: r.state,
    intervalMonths: r.interval_months,
    planHz: plan.map((p) => p.frequency_hz),
  };
}

export function getMeterByAsset(db: LabDb, assetId: string): MeterRecord | undefined {
  const row = cachedStatement(db, 'SELECT * FROM meter WHERE asset_id = ?').get(assetId) as
    MeterRow | undefined;
  return row && { id: row.id, meter: rowToMeter(db, row) };
}

export function listMeterRecords(db: LabDb): MeterRecord[] {
  return (db.prepare('SELECT * FROM meter ORDER BY asset_id').all() as MeterRow[]).map((row) => ({
    id: row.id,
    meter: rowToMeter(db, row),
  }));
}

/** A meter's specification columns (everything a spec revision may change), named as the
 * statements bind them; shared by the insert and the spec update so the two never diverge. */
export function meterSpecToRow(m: Meter) {
  return {
    description: m.description,
    construction: m.construction,
    port: m.port,
    min_hz: m.minHz,
    max_hz: m.maxHz,
    dial_kind: m.dialKind,
    accuracy_rel_ppm: m.accuracyRelPpm,
    accuracy_abs_hz: m.accuracyAbsHz,
    resolution: m.resolution,
    alpha_per_k: m.alphaPerK,
    u_alpha_per_k: m.alphaUncertaintyPerK,
    ref_temperature_c: m.reference.temperatureC,
    ref_pressure_hpa: m.reference.pressureHpa,
    ref_humidity_pct: m.reference.humidityPct,
    loaded_q: m.loadedQ,
    setting_fraction: m.settingFraction,
    min_dip_db: m.minDipDb,
    max_input_power_w: m.maxInputPowerW,
    location: m.location,
    interval_months: m.intervalMonths,
  };
}

export function insertMeter(db: LabDb, m: Meter, createdAt: string): number {
  const info = db
    .prepare(
      `INSERT INTO meter (asset_id, description, construction, port, min_hz, max_hz, dial_kind, accuracy_rel_ppm,
         accuracy_abs_hz, resolution, alpha_per_k, u_alpha_per_k, ref_temperature_c, ref_pressure_hpa, ref_humidity_pct,
         loaded_q, setting_fraction, min_dip_db, max_input_power_w, location, state, interval_months, created_at)
       VALUES (@asset_id, @description, @construction, @port, @min_hz, @max_hz, @dial_kind, @accuracy_rel_ppm,
         @accuracy_abs_hz, @resolution, @alpha_per_k, @u_alpha_per_k, @ref_temperature_c, @ref_pressure_hpa,
         @ref_humidity_pct, @loaded_q, @setting_fraction, @min_dip_db, @max_input_power_w, @location, @state,
         @interval_months, @created_at)`,
    )
    .run({ ...meterSpecToRow(m), asset_id: m.assetId, state: m.state, created_at: createdAt });
  const id = Number(info.lastInsertRowid);
  const chart = db.prepare(
    'INSERT INTO meter_chart_point (meter_id, divisions, frequency_hz) VALUES (?, ?, ?)',
  );
  for (const c of m.chart) chart.run(id, c.divisions, c.frequencyHz);
  const plan = db.prepare('INSERT INTO meter_plan_point (meter_id, frequency_hz) VALUES (?, ?)');
  for (const f of m.planHz) plan.run(id, f);
  return id;
}

export function setMeterState(db: LabDb, meterId: number, state: Meter['state']): void {
  const info = db.prepare('UPDATE meter SET state = ? WHERE id = ?').run(state, meterId);
  if (info.changes !== 1) throw new Error(`meter ${meterId}: expected 1 row changed, got ${info.changes}`);
}

export interface RegisterDbRow {
  assetId: string;
  description: string;
  construction: Meter['construction'];
  minHz: number;
  maxHz: number;
  state: Meter['state'];
  intervalMonths: number;
  lastCheckDate: string | null;
  lastVerdict: Verdict | null;
}

/** One row per meter with its newest check (at its effective revision: newest signed, else newest
 * draft); one query for the whole register. */
export function registerRows(db: LabDb): RegisterDbRow[] {
  const rows = db
    .prepare(
      `WITH newest_revision AS (
         SELECT cr.check_id, cr.performed_on, cr.as_left_verdict, cr.id,
                ROW_NUMBER() OVER (PARTITION BY cr.check_id ORDER BY (cr.state <> 'draft') DESC, cr.revision DESC) AS rn
         FROM check_revision cr
       ), newest_check AS (
         SELECT ce.meter_id, nr.performed_on, nr.as_left_verdict,
                ROW_NUMBER() OVER (PARTITION BY ce.meter_id ORDER BY nr.performed_on DESC, nr.id DESC) AS rn
         FROM newest_revision nr JOIN check_event ce ON ce.id = nr.check_id
         WHERE nr.rn = 1
       )
       SELECT m.asset_id, m.description, m.construction, m.min_hz, m.max_hz, m.state, m.interval_months,
              nc.performed_on, nc.as_left_verdict
       FROM meter m LEFT JOIN newest_check nc ON nc.meter_id = m.id AND nc.rn = 1
       ORDER BY m.asset_id`,
    )
    .all() as {
    asset_id: string;
    description: string;
    construction: Meter['construction'];
    min_hz: number;
    max_hz: number;
    state: Meter['state'];
    interval_months: number;
    performed_on: string | null;
    as_left_verdict: Verdict | null;
  }[];
  return rows.map((r) => ({
    assetId: r.asset_id,
    description: r.description,
    construction: r.construction,
    minHz: r.min_hz,
    maxHz: r.max_hz,
    state: r.state,
    intervalMonths: r.interval_months,
    lastCheckDate: r.performed_on,
    lastVerdict: r.as_left_verdict,
  }));
}
