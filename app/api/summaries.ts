// Per-meter summaries kept in memory for the fleet-wide answers: the register's flag words and
// the attributes-method evidence of each meter. A summary is trusted only while the meter's
// generation (raised by the triggers of migration 0006 whenever its checks, their revisions or
// points, or the meter itself change, by any path or process) is the one it was made from, and
// the flag words also only for the day they were made on (a drift exit becomes "soon" with time).
// Reads never write: the lab file holds only the generations, written by the triggers.
import type { AttributeRecord } from '../engine/intervals';
import type { LabDb } from '../../db/store';
import {
  attributeChecks,
  meterGenerations,
  type AttributeCheckRow,
  type MeterGenerationRow,
} from '../../db/queries/summaries';
import type { RegisterRow } from './contract';
import type { ServiceContext } from './context';
import { daysBetween } from './support';

const DAYS_PER_YEAR = 365.25;

interface MeterSummary {
  flags?: { generation: number; today: string; words: string[] };
  attributes?: { generation: number; records: AttributeRecord[] };
}

/** Whether summaries are used; the cache test turns them off (kept, neither read nor written)
 * to compare cached answers with fresh ones. */
const DISABLED = new WeakSet<LabDb>();
const SUMMARIES = new WeakMap<LabDb, Map<number, MeterSummary>>();
/** How many summaries were computed rather than reused, per database (for the cache test). */
const COMPUTED = new WeakMap<LabDb, { flags: number; attributes: number }>();

export function setSummariesEnabled(db: LabDb, enabled: boolean): void {
  if (enabled) DISABLED.delete(db);
  else DISABLED.add(db);
}

export function summariesComputed(db: LabDb): { flags: number; attributes: number } {
  return { ...(COMPUTED.get(db) ?? { flags: 0, attributes: 0 }) };
}

function counted(db: LabDb, kind: 'flags' | 'attributes', n: number): void {
  const c = COMPUTED.get(db) ?? { flags: 0, attributes: 0 };
  c[kind] += n;
  COMPUTED.set(db, c);
}

function summariesOf(db: LabDb): Map<number, MeterSummary> {
  let m = SUMMARIES.get(db);
  if (!m) {
    m = new Map();
    SUMMARIES.set(db, m);
  }
  return m;
}

/** Register flag words of each row (same order), from the summaries where they are current and
 * from `compute` (the full history analysis) where not. */
export function cachedRegisterFlags(
  ctx: ServiceContext,
  rows: RegisterRow[],
  compute: (meterId: number, row: RegisterRow) => string[],
): string[][] {
  const byAsset = new Map(meterGenerations(ctx.db).map((g) => [g.assetId, g]));
  const today = ctx.clock.today();
  const enabled = !DISABLED.has(ctx.db);
  const cache = summariesOf(ctx.db);
  return rows.map((row) => {
    const g = byAsset.get(row.assetId);
    if (!g) return [];
    if (!enabled) return compute(g.meterId, row);
    const s = cache.get(g.meterId) ?? {};
    if (s.flags && s.flags.generation === g.generation && s.flags.today === today) return [...s.flags.words];
    const words = compute(g.meterId, row);
    counted(ctx.db, 'flags', 1);
    s.flags = { generation: g.generation, today, words: [...words] };
    cache.set(g.meterId, s);
    return words;
  });
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
  const group = meterGenerations(db).filter(include);
  const enabled = !DISABLED.has(db);
  const cache = summariesOf(db);
  const stale = group.filter((g) => {
    const a = cache.get(g.meterId)?.attributes;
    return !enabled || !a || a.generation !== g.generation;
  });
  const fresh = new Map<number, AttributeRecord[]>();
  if (enabled) counted(db, 'attributes', stale.length);
  if (stale.length >= FLEET_PASS_FROM) {
    const byMeter = new Map<number, AttributeCheckRow[]>();
    for (const r of attributeChecks(db)) {
      const list = byMeter.get(r.meterId) ?? [];
      list.push(r);
      byMeter.set(r.meterId, list);
    }
    for (const g of stale) fresh.set(g.meterId, attributeRecordsOf(byMeter.get(g.meterId) ?? []));
  } else {
    for (const g of stale) fresh.set(g.meterId, attributeRecordsOf(attributeChecks(db, g.meterId)));
  }
  const records: AttributeRecord[] = [];
  for (const g of group) {
    let list = fresh.get(g.meterId);
    if (list && enabled) {
      const s = cache.get(g.meterId) ?? {};
      s.attributes = { generation: g.generation, records: list };
      cache.set(g.meterId, s);
    }
    list ??= cache.get(g.meterId)?.attributes?.records ?? [];
    for (const r of list) records.push({ ...r });
  }
  return { records, meters: group.map((g) => g.assetId) };
}
