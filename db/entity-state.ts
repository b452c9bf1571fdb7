// What each audited entity is in the lab file, and a digest of its present content: every row of
// every table that records, states or derives something about it, canonical per RFC 8785
// (JSON Canonicalization Scheme) and hashed with SHA-256. Each audit entry written by the program
// carries the digest of the entity it changed, as it stood after the change; `integrity`
// recomputes every digest from the tables and compares it with the newest entry for the entity,
// so a row changed, deleted or inserted outside the program is named.
//
// Rows are taken whole (every column, so a derived column such as a stored verdict, error or
// fraction is covered with the data it came from); a NULL cell is left out, so a later migration
// that adds a column left NULL on old rows changes no digest. A BLOB stands in by its SHA-256
// (an issued document's PDF, a sweep's trace). Rows of a table are sorted by their canonical
// text, so the digest does not depend on the order SQLite returns them in.
//
// Derived data that no entity covers is recomputed before it is shown: meter_generation (raised by
// triggers) and meter_summary (trusted only while its generation matches; integrity compares it
// with a fresh computation).
import { createHash } from 'node:crypto';
import type Database from 'better-sqlite3';
import { canonicalJson } from '../app/signing/canonical-json';
import { cachedStatement } from './statements';

export const ENTITY_STATE_FORMAT = 'dipledger.entity-state/1';

interface Part {
  table: string;
  /** Selects the entity's key as "~k" and the table's row (t.*), for every row of the table. */
  all: string;
  /** The same rows for one entity, with the parameters of `params`. */
  where: string;
}

interface EntityKind {
  entity: string;
  /** The query parameters naming one entity in `where` (from its audit entity id). */
  params: (entityId: string) => unknown[] | undefined;
  parts: Part[];
}

const byInteger = (id: string): unknown[] | undefined =>
  /^[1-9]\d{0,15}$/.test(id) ? [Number(id)] : undefined;
const byText = (id: string): unknown[] => [id];

const REVISION_OF_ROW = 'LEFT JOIN check_revision r ON r.id = t.revision_id';
const REVISION_OF_POINT =
  'LEFT JOIN check_point p ON p.id = t.point_id LEFT JOIN check_revision r ON r.id = p.revision_id';

/** Every audited entity and the tables it is made of. Tables that are derived only
 * (meter_generation, meter_summary), the trail itself and the migration log are not here. */
export const ENTITY_KINDS: readonly EntityKind[] = [
  {
    entity: 'lab',
    params: byInteger,
    parts: [{ table: 'lab', all: 'SELECT t.id AS "~k", t.* FROM lab t', where: 't.id = ?' }],
  },
  {
    entity: 'person',
    params: byInteger,
    parts: [{ table: 'person', all: 'SELECT t.id AS "~k", t.* FROM person t', where: 't.id = ?' }],
  },
  {
    entity: 'person-key',
    params: byInteger,
    parts: [{ table: 'person_key', all: 'SELECT t.id AS "~k", t.* FROM person_key t', where: 't.id = ?' }],
  },
  {
    entity: 'meter',
    params: byText,
    parts: [
      { table: 'meter', all: 'SELECT t.asset_id AS "~k", t.* FROM meter t', where: 't.asset_id = ?' },
      {
        table: 'meter_chart_point',
        all: 'SELECT m.asset_id AS "~k", t.* FROM meter_chart_point t LEFT JOIN meter m ON m.id = t.meter_id',
        where: 'm.asset_id = ?',
      },
      {
        table: 'meter_plan_point',
        all: 'SELECT m.asset_id AS "~k", t.* FROM meter_plan_point t LEFT JOIN meter m ON m.id = t.meter_id',
        where: 'm.asset_id = ?',
      },
    ],
  },
  {
    entity: 'standard',
    params: byText,
    parts: [
      { table: 'standard', all: 'SELECT t.asset_id AS "~k", t.* FROM standard t', where: 't.asset_id = ?' },
      {
        table: 'standard_certificate',
        all: 'SELECT s.asset_id AS "~k", t.* FROM standard_certificate t LEFT JOIN standard s ON s.id = t.standard_id',
        where: 's.asset_id = ?',
      },
    ],
  },
  {
    entity: 'check',
    params: byInteger,
    parts: [
      { table: 'check_event', all: 'SELECT t.id AS "~k", t.* FROM check_event t', where: 't.id = ?' },
      {
        table: 'check_revision',
        all: 'SELECT t.check_id AS "~k", t.* FROM check_revision t',
        where: 't.check_id = ?',
      },
      ...['check_revision_standard', 'check_point', 'check_signature'].map((table) => ({
        table,
        all: `SELECT r.check_id AS "~k", t.* FROM ${table} t ${REVISION_OF_ROW}`,
        where: 'r.check_id = ?',
      })),
      ...['reading', 'sweep'].map((table) => ({
        table,
        all: `SELECT r.check_id AS "~k", t.* FROM ${table} t ${REVISION_OF_POINT}`,
        where: 'r.check_id = ?',
      })),
    ],
  },
  {
    entity: 'draft',
    params: byInteger,
    parts: [{ table: 'check_draft', all: 'SELECT t.id AS "~k", t.* FROM check_draft t', where: 't.id = ?' }],
  },
  {
    entity: 'document',
    params: (id) => {
      const m = /^(.+) revision ([1-9]\d{0,8})$/.exec(id);
      return m ? [m[1], Number(m[2])] : undefined;
    },
    parts: [
      {
        table: 'issued_document',
        all: `SELECT t.number || ' revision ' || t.revision AS "~k", t.* FROM issued_document t`,
        where: 't.number = ? AND t.revision = ?',
      },
      {
        table: 'issued_document_signature',
        all: `SELECT d.number || ' revision ' || d.revision AS "~k", t.* FROM issued_document_signature t
              LEFT JOIN issued_document d ON d.id = t.document_id`,
        where: 'd.number = ? AND d.revision = ?',
      },
    ],
  },
];

const KIND_BY_ENTITY = new Map(ENTITY_KINDS.map((k) => [k.entity, k]));

export function isTrackedEntity(entity: string): boolean {
  return KIND_BY_ENTITY.has(entity);
}

type Row = Record<string, unknown>;

/** A row as it enters the digest: NULL cells left out, BLOBs as their SHA-256, numbers that JSON
 * cannot hold as text. */
function plainRow(row: Row): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const [col, v] of Object.entries(row)) {
    if (col === '~k' || v === null || v === undefined) continue;
    if (Buffer.isBuffer(v)) out[col] = { sha256: createHash('sha256').update(v).digest('hex') };
    else if (typeof v === 'number' && !Number.isFinite(v)) out[col] = { number: String(v) };
    else if (typeof v === 'bigint') out[col] = { integer: v.toString() };
    else out[col] = v;
  }
  return out;
}

function digestOf(entity: string, entityId: string, tables: Map<string, string[]>): string | null {
  if ([...tables.values()].every((rows) => rows.length === 0)) return null;
  const content: Record<string, unknown> = {};
  for (const [table, rows] of [...tables].sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)))
    if (rows.length > 0) content[table] = [...rows].sort().map((r) => JSON.parse(r) as unknown);
  const text = canonicalJson({ format: ENTITY_STATE_FORMAT, entity, id: entityId, tables: content });
  return createHash('sha256').update(text).digest('hex');
}

const canonicalRow = (row: Row): string => canonicalJson(plainRow(row));

/** The digest of one entity's present content, or null when it has no rows (or is not tracked). */
export function entityDigest(db: Database.Database, entity: string, entityId: string): string | null {
  const kind = KIND_BY_ENTITY.get(entity);
  const params = kind?.params(entityId);
  if (!kind || !params) return null;
  const tables = new Map<string, string[]>();
  for (const part of kind.parts) {
    const rows = cachedStatement(db, `${part.all} WHERE ${part.where}`).all(...params) as Row[];
    tables.set(part.table, rows.map(canonicalRow));
  }
  return digestOf(entity, entityId, tables);
}

/** Every entity present in the file with its digest, keyed `entity + "\u0000" + id`; rows that
 * belong to no entity (their parent row is gone) are listed under `orphans` by table. */
export function allEntityDigests(db: Database.Database): {
  digests: Map<string, string>;
  orphans: { table: string; rows: number }[];
} {
  const digests = new Map<string, string>();
  const orphans: { table: string; rows: number }[] = [];
  for (const kind of ENTITY_KINDS) {
    const byId = new Map<string, Map<string, string[]>>();
    for (const part of kind.parts) {
      let lost = 0;
      for (const row of db.prepare(part.all).iterate() as IterableIterator<Row>) {
        const key = row['~k'] as string | number | null;
        if (key === null) {
          lost += 1;
          continue;
        }
        const id = String(key);
        let tables = byId.get(id);
        if (!tables) {
          tables = new Map(kind.parts.map((p) => [p.table, []]));
          byId.set(id, tables);
        }
        tables.get(part.table)?.push(canonicalRow(row));
      }
      if (lost > 0) orphans.push({ table: part.table, rows: lost });
    }
    for (const [id, tables] of byId) {
      const d = digestOf(kind.entity, id, tables);
      if (d) digests.set(entityKey(kind.entity, id), d);
    }
  }
  return { digests, orphans };
}

export const entityKey = (entity: string, entityId: string): string => `${entity}\u0000${entityId}`;
