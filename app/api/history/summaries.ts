// Per-meter summaries for the fleet-wide answers: the register's flag words and the
// attributes-method evidence of each meter. A summary is trusted only while the meter's
// generation (raised by the triggers of migration 0006 whenever its checks, their revisions or
// points, or the meter itself change, by any path or process) is the one it was made from.
// The flag summary holds no date: the one flag that depends on the day (a projected drift exit
// within a few years of today) is kept with its date and resolved at each read, so a new day
// recomputes nothing.
// Summaries live in memory per database handle and, where the file has the table of migration
// 0007 and can be written at once, in the lab file too, so a new process (every CLI command)
// reads them instead of recomputing every meter's history. A read never fails or waits for
// want of writing them (db/queries/summaries.ts storeSummaries).
import type { AttributeRecord } from '../../engine/intervals';
import { ENGINE_VERSION } from '../../engine/version';
import type { LabDb } from '../../../db/store';
import {
  attributeChecks,
  meterGenerations,
  storedSummaries,
  storeSummaries,
  type AttributeCheckRow,
  type MeterGenerationRow,
  type StoredSummaryRow,
  type SummaryKind,
} from '../../../db/queries/summaries';
import type { RegisterRow } from '../contract';
import type { ServiceContext } from '../ops/context';
import { daysBetween } from '../clock';

const DAYS_PER_YEAR = 365.25;

/**
 * The version of what the summaries hold, stored with each one in the lab file: a summary made
 * by another version is recomputed. Raise SUMMARY_FORMAT whenever anything that feeds them
 * changes (the flags of history/analysis.ts analyseMeter and what it calls in engine/drift.ts, or
 * attributeRecordsOf below); test/api/stored-summaries.test.ts pins what the demo lab's
 * summaries hold to this number.
 */
export const SUMMARY_FORMAT = 2;
export const SUMMARIES_MADE_BY = `engine ${ENGINE_VERSION}, summaries ${SUMMARY_FORMAT}`;

/** One register flag word; `exitDate` marks the drift-exit word, shown only on the days it is
 * a warning (worked out by the caller from `epoch` and the day). */
export interface FlagWord {
  short: string;
  exitDate?: string;
}

/** The date-independent part of a meter's register flags, in the order they are shown. */
export interface FlagSummary {
  /** Date of the newest check, the epoch of the meter's timeline (null without checks). */
  epoch: string | null;
  words: FlagWord[];
}

interface MeterSummary {
  flags?: { generation: number; summary: FlagSummary };
  attributes?: { generation: number; records: AttributeRecord[] };
}

/** Whether summaries are used; the cache test turns them off (kept, neither read nor written,
 * in memory or in the file) to compare cached answers with fresh ones. */
const DISABLED = new WeakSet<LabDb>();
const SUMMARIES = new WeakMap<LabDb, Map<number, MeterSummary>>();
/** Per database: how many summaries were computed rather than reused, and how many were read
 * from or written to the lab file (for the cache test). */
interface Counts {
  flags: number;
  attributes: number;
  loaded: number;
  stored: number;
}
const COUNTS = new WeakMap<LabDb, Counts>();

export function setSummariesEnabled(db: LabDb, enabled: boolean): void {
  if (enabled) DISABLED.delete(db);
  else DISABLED.add(db);
}

/** Drops the summaries held in memory for a database, as a new process starts without them. */
export function forgetSummaries(db: LabDb): void {
  SUMMARIES.delete(db);
}

export function summariesComputed(db: LabDb): Counts {
  return { ...(COUNTS.get(db) ?? { flags: 0, attributes: 0, loaded: 0, stored: 0 }) };
}

function counted(db: LabDb, kind: keyof Counts, n: number): void {
  const c = COUNTS.get(db) ?? { flags: 0, attributes: 0, loaded: 0, stored: 0 };
  c[kind] += n;
  COUNTS.set(db, c);
}

function summariesOf(db: LabDb): Map<number, MeterSummary> {
  let m = SUMMARIES.get(db);
  if (!m) {
    m = new Map();
    SUMMARIES.set(db, m);
  }
  return m;
}

/** Fills the memory from the lab file for the meters in `wanted` whose stored summary of this
 * kind is current, and returns the meters still without one. */
function loadStored(
  db: LabDb,
  kind: SummaryKind,
  wanted: MeterGenerationRow[],
  take: (s: MeterSummary, generation: number, json: string) => void,
): MeterGenerationRow[] {
  if (wanted.length === 0) return wanted;
  const stored = new Map(storedSummaries(db, kind, SUMMARIES_MADE_BY).map((r) => [r.meterId, r]));
  const cache = summariesOf(db);
  const still: MeterGenerationRow[] = [];
  for (const g of wanted) {
    const r = stored.get(g.meterId);
    if (r && r.generation === g.generation) {
      const s = cache.get(g.meterId) ?? {};
      take(s, g.generation, r.summaryJson);
      cache.set(g.meterId, s);
      counted(db, 'loaded', 1);
    } else still.push(g);
  }
  return still;
}

function store(db: LabDb, kind: SummaryKind, rows: StoredSummaryRow[]): void {
  if (storeSummaries(db, kind, SUMMARIES_MADE_BY, rows)) counted(db, 'stored', rows.length);
}

/**
 * Register flag words of each row (same order): from the summaries where they are current, from
 * `compute` (the meter's history analysis) where not; `resolve` turns a summary into the words
 * shown today.
 */
export function cachedRegisterFlags(
  ctx: ServiceContext,
  rows: RegisterRow[],
  compute: (meterId: number, row: RegisterRow) => FlagSummary,
  resolve: (summary: FlagSummary) => string[],
): string[][] {
  // Generations are read before any history, so a summary is never labelled newer than the
  // history it was made from (a write in between only makes it look stale).
  const byAsset = new Map(meterGenerations(ctx.db).map((g) => [g.assetId, g]));
  const enabled = !DISABLED.has(ctx.db);
  const cache = summariesOf(ctx.db);
  if (enabled) {
    const missing = rows
      .map((r) => byAsset.get(r.assetId))
      .filter((g): g is MeterGenerationRow => {
        const f = g && cache.get(g.meterId)?.flags;
        return g !== undefined && (!f || f.generation !== g.generation);
      });
    loadStored(ctx.db, 'flags', missing, (s, generation, json) => {
      s.flags = { generation, summary: JSON.parse(json) as FlagSummary };
    });
  }
  const made: StoredSummaryRow[] = [];
  const words = rows.map((row) => {
    const g = byAsset.get(row.assetId);
    if (!g) return [];
    if (!enabled) return resolve(compute(g.meterId, row));
    const s = cache.get(g.meterId) ?? {};
    if (!s.flags || s.flags.generation !== g.generation) {
      const summary = compute(g.meterId, row);
      counted(ctx.db, 'flags', 1);
      s.flags = { generation: g.generation, summary };
      cache.set(g.meterId, s);
      made.push({ meterId: g.meterId, generation: g.generation, summaryJson: JSON.stringify(summary) });
    }
    return resolve(s.flags.summary);
  });
  if (enabled) store(ctx.db, 'flags', made);
  return words;
}

/** The attributes method's records of one meter's history: for each check after the first, the
 * time since the one before it and whether every as-found point was within tolerance (checks
 * without as-found points, or on the same day, give none). Oldest first. */
export function attributeRecordsOf(checks: AttributeCheckRow[]): AttributeRecord[] {
  const records: AttributeRecord[] = [];
  for (let i = 1; i < checks.length; i++) {
    const prev = checks[i - 1] as AttributeCheckRow;
    const c = checks[i] as AttributeCheckRow;
    const days = daysBetween(prev.date, c.date);
    if (c.foundPoints === 0 || days <= 0) continue;
    records.push({ interval: days / DAYS_PER_YEAR, inTolerance: !c.foundOut });
  }
  return records;
}

/** Above this many stale meters one pass over the whole fleet beats a query per meter. */
const FLEET_PASS_FROM = 32;

/** The attributes-method records of every meter for which `include` holds, meter by meter in
 * asset-id order, with their asset ids. */
export function cachedAttributeRecords(
  db: LabDb,
  include: (g: MeterGenerationRow) => boolean,
): { records: AttributeRecord[]; meters: string[] } {
  const all = meterGenerations(db);
  const group = all.filter(include);
  const enabled = !DISABLED.has(db);
  const cache = summariesOf(db);
  const isStale = (g: MeterGenerationRow) => {
    const a = cache.get(g.meterId)?.attributes;
    return !enabled || !a || a.generation !== g.generation;
  };
  let stale = group.filter(isStale);
  if (enabled) {
    stale = loadStored(db, 'attributes', stale, (s, generation, json) => {
      s.attributes = { generation, records: JSON.parse(json) as AttributeRecord[] };
    });
    counted(db, 'attributes', stale.length);
  }
  const fresh = new Map<number, AttributeRecord[]>();
  if (stale.length >= FLEET_PASS_FROM) {
    const byMeter = new Map<number, AttributeCheckRow[]>();
    for (const r of attributeChecks(db)) {
      const list = byMeter.get(r.meterId) ?? [];
      list.push(r);
      byMeter.set(r.meterId, list);
    }
    // The pass read every meter: keep them all, so the next group's first page needs no pass.
    const also = enabled ? all.filter((g) => !include(g) && isStale(g)) : [];
    for (const g of [...stale, ...also])
      fresh.set(g.meterId, attributeRecordsOf(byMeter.get(g.meterId) ?? []));
  } else {
    for (const g of stale) fresh.set(g.meterId, attributeRecordsOf(attributeChecks(db, g.meterId)));
  }
  const made: StoredSummaryRow[] = [];
  if (enabled) {
    for (const g of all) {
      const list = fresh.get(g.meterId);
      if (!list) continue;
      const s = cache.get(g.meterId) ?? {};
      s.attributes = { generation: g.generation, records: list };
      cache.set(g.meterId, s);
      made.push({ meterId: g.meterId, generation: g.generation, summaryJson: JSON.stringify(list) });
    }
    store(db, 'attributes', made);
  }
  const records: AttributeRecord[] = [];
  for (const g of group) {
    const list = fresh.get(g.meterId) ?? cache.get(g.meterId)?.attributes?.records ?? [];
    for (const r of list) records.push({ ...r });
  }
  return { records, meters: group.map((g) => g.assetId) };
}
