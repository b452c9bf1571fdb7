// Reads behind the per-meter summaries (app/api/summaries.ts): each meter's generation (raised by
// the triggers of 0006 on every change to its history), one meter's register row without the
// whole register, the interval evidence of the attributes method straight from the stored point
// columns, for one meter or the whole fleet in a single pass, and the summaries kept in the lab
// file (0007).
import Database, { type Statement } from 'better-sqlite3';
import type { Meter } from '../../app/model/records';
import type { LabDb } from '../store';
import type { RegisterDbRow } from './meters';

/** Statements prepared once per database handle: these run once per meter on the fleet paths. */
const STATEMENTS = new WeakMap<LabDb, Map<string, Statement>>();

function statement(db: LabDb, sql: string): Statement {
  let byText = STATEMENTS.get(db);
  if (!byText) {
    byText = new Map();
    STATEMENTS.set(db, byText);
  }
  let s = byText.get(sql);
  if (!s) {
    s = db.prepare(sql);
    byText.set(sql, s);
  }
  return s;
}

export interface MeterGenerationRow {
  meterId: number;
  assetId: string;
  construction: Meter['construction'];
  minHz: number;
  maxHz: number;
  /** 0 for a meter the triggers have not seen (cannot happen after 0006; kept total). */
  generation: number;
}

/** Every meter with its generation and what groups it with similar meters, by asset id. */
export function meterGenerations(db: LabDb): MeterGenerationRow[] {
  return (
    statement(
      db,
      `SELECT m.id, m.asset_id, m.construction, m.min_hz, m.max_hz, coalesce(g.generation, 0) AS generation
       FROM meter m LEFT JOIN meter_generation g ON g.meter_id = m.id ORDER BY m.asset_id`,
    ).all() as {
      id: number;
      asset_id: string;
      construction: Meter['construction'];
      min_hz: number;
      max_hz: number;
      generation: number;
    }[]
  ).map((r) => ({
    meterId: r.id,
    assetId: r.asset_id,
    construction: r.construction,
    minHz: r.min_hz,
    maxHz: r.max_hz,
    generation: r.generation,
  }));
}

export function meterGeneration(db: LabDb, meterId: number): number {
  const r = statement(db, 'SELECT generation FROM meter_generation WHERE meter_id = ?').get(meterId) as
    { generation: number } | undefined;
  return r?.generation ?? 0;
}

/** The register row of one meter: the same rule as registerRows (db/queries/meters.ts), newest
 * check at its effective revision (newest signed, else newest draft), limited to that meter. */
export function registerRowOfMeter(db: LabDb, meterId: number): RegisterDbRow | undefined {
  const r = statement(
    db,
    `WITH newest_revision AS (
       SELECT cr.check_id, cr.performed_on, cr.as_left_verdict, cr.id,
              ROW_NUMBER() OVER (PARTITION BY cr.check_id ORDER BY (cr.state <> 'draft') DESC, cr.revision DESC) AS rn
       FROM check_revision cr JOIN check_event ce ON ce.id = cr.check_id WHERE ce.meter_id = @meterId
     ), newest_check AS (
       SELECT nr.performed_on, nr.as_left_verdict,
              ROW_NUMBER() OVER (ORDER BY nr.performed_on DESC, nr.id DESC) AS rn
       FROM newest_revision nr WHERE nr.rn = 1
     )
     SELECT m.asset_id, m.description, m.construction, m.min_hz, m.max_hz, m.state, m.interval_months,
            nc.performed_on, nc.as_left_verdict
     FROM meter m LEFT JOIN newest_check nc ON nc.rn = 1
     WHERE m.id = @meterId`,
  ).get({ meterId }) as
    | {
        asset_id: string;
        description: string;
        construction: RegisterDbRow['construction'];
        min_hz: number;
        max_hz: number;
        state: RegisterDbRow['state'];
        interval_months: number;
        performed_on: string | null;
        as_left_verdict: RegisterDbRow['lastVerdict'];
      }
    | undefined;
  return (
    r && {
      assetId: r.asset_id,
      description: r.description,
      construction: r.construction,
      minHz: r.min_hz,
      maxHz: r.max_hz,
      state: r.state,
      intervalMonths: r.interval_months,
      lastCheckDate: r.performed_on,
      lastVerdict: r.as_left_verdict,
    }
  );
}

/** One check at its effective revision, as the attributes method sees it. */
export interface AttributeCheckRow {
  meterId: number;
  date: string;
  /** As-found points of the check. */
  foundPoints: number;
  /** Whether any as-found point had |error| above its tolerance. */
  foundOut: boolean;
}

const ATTRIBUTE_SQL = (where: string) => `
  WITH newest AS (
    SELECT cr.id, cr.check_id, cr.performed_on, ce.meter_id,
           ROW_NUMBER() OVER (PARTITION BY cr.check_id ORDER BY (cr.state <> 'draft') DESC, cr.revision DESC) AS rn
    FROM check_revision cr JOIN check_event ce ON ce.id = cr.check_id ${where}
  )
  SELECT n.meter_id, n.performed_on,
         coalesce(sum(cp.phase = 'as-found'), 0) AS found,
         coalesce(max(cp.phase = 'as-found' AND abs(cp.error_hz) > cp.tolerance_hz), 0) AS found_out
  FROM newest n LEFT JOIN check_point cp ON cp.revision_id = n.id
  WHERE n.rn = 1
  GROUP BY n.id
  ORDER BY n.meter_id, n.performed_on, n.check_id`;

type AttributeSqlRow = { meter_id: number; performed_on: string; found: number; found_out: number };

const toAttributeRow = (r: AttributeSqlRow): AttributeCheckRow => ({
  meterId: r.meter_id,
  date: r.performed_on,
  foundPoints: r.found,
  foundOut: r.found_out === 1,
});

/** Every check of one meter (oldest first, the order of meterHistory), or of every meter when
 * meterId is undefined (grouped by meter, each oldest first). Reads the stored point columns
 * error_hz and tolerance_hz, which hold the same numbers as the stored results. */
export function attributeChecks(db: LabDb, meterId?: number): AttributeCheckRow[] {
  const rows =
    meterId === undefined
      ? (statement(db, ATTRIBUTE_SQL('')).all() as AttributeSqlRow[])
      : (statement(db, ATTRIBUTE_SQL('WHERE ce.meter_id = ?')).all(meterId) as AttributeSqlRow[]);
  return rows.map(toAttributeRow);
}

// ---------------------------------------------------------------------------------------------
// Summaries kept in the lab file (migration 0007): derived data a new process reads instead of
// recomputing. Optional in every way: a file without the table (older schema, opened read-only)
// has none, and a write that cannot happen at once is skipped.

export type SummaryKind = 'flags' | 'attributes';

export interface StoredSummaryRow {
  meterId: number;
  generation: number;
  summaryJson: string;
}

/** Whether this file holds the summary table (schema 8 or later). */
export function hasStoredSummaries(db: LabDb): boolean {
  return (
    statement(
      db,
      "SELECT 1 AS one FROM sqlite_master WHERE type = 'table' AND name = 'meter_summary'",
    ).get() !== undefined
  );
}

/** The stored summaries of one kind made by this version of the analysis (`madeBy`). */
export function storedSummaries(db: LabDb, kind: SummaryKind, madeBy: string): StoredSummaryRow[] {
  if (!hasStoredSummaries(db)) return [];
  return (
    statement(
      db,
      'SELECT meter_id, generation, summary_json FROM meter_summary WHERE kind = ? AND made_by = ?',
    ).all(kind, madeBy) as { meter_id: number; generation: number; summary_json: string }[]
  ).map((r) => ({ meterId: r.meter_id, generation: r.generation, summaryJson: r.summary_json }));
}

/**
 * Stores summaries in one transaction, only if that can happen at once: never on a read-only
 * handle, a file without the table, or inside a caller's transaction, and without waiting for
 * another process's write lock (busy_timeout 0 for the attempt). Returns whether they were
 * stored; a summary that could not be stored is simply made again by the next process.
 */
export function storeSummaries(
  db: LabDb,
  kind: SummaryKind,
  madeBy: string,
  rows: readonly StoredSummaryRow[],
): boolean {
  if (rows.length === 0 || db.readonly || db.inTransaction || !hasStoredSummaries(db)) return false;
  const upsert = statement(
    db,
    `INSERT INTO meter_summary (meter_id, kind, generation, made_by, summary_json) VALUES (?, ?, ?, ?, ?)
     ON CONFLICT (meter_id, kind) DO UPDATE SET
       generation = excluded.generation, made_by = excluded.made_by, summary_json = excluded.summary_json`,
  );
  const timeout = db.pragma('busy_timeout', { simple: true }) as number;
  db.pragma('busy_timeout = 0');
  try {
    db.transaction(() => {
      for (const r of rows) upsert.run(r.meterId, kind, r.generation, madeBy, r.summaryJson);
    })();
    return true;
  } catch (e) {
    // Busy, read-only file, disk full...: the summaries are derived, the read goes on without.
    if (e instanceof Database.SqliteError) return false;
    throw e;
  } finally {
    db.pragma(`busy_timeout = ${timeout}`);
  }
}
