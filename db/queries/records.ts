// Signing keys, signatures, revisions and the audit trail as rows: what the records operations
// and the integrity check read and write. Row <-> model conversion is explicit here.
import type { Person } from '../../app/model/records';
import type {
  AuditEntryView,
  AuditQuery,
  CheckSignature,
  RevisionSummary,
  SignatureMeaning,
  StandardUsed,
} from '../../app/model/revisions';
import type { SealedKey } from '../../app/signing/keys';
import type { LabDb } from '../store';
import { cachedStatement } from '../statements';

interface KeyRow {
  id: number;
  person_id: number;
  public_key_pem: string;
  fingerprint: string;
  kdf: 'scrypt';
  kdf_n: number;
  kdf_r: number;
  kdf_p: number;
  salt_b64: string;
  iv_b64: string;
  tag_b64: string;
  encrypted_private_key_b64: string;
  created_at: string;
}

export interface PersonKey {
  id: number;
  personId: number;
  createdAt: string;
  sealed: SealedKey;
}

const rowToKey = (r: KeyRow): PersonKey => ({
  id: r.id,
  personId: r.person_id,
  createdAt: r.created_at,
  sealed: {
    publicKeyPem: r.public_key_pem,
    fingerprint: r.fingerprint,
    kdf: r.kdf,
    kdfN: r.kdf_n,
    kdfR: r.kdf_r,
    kdfP: r.kdf_p,
    saltB64: r.salt_b64,
    ivB64: r.iv_b64,
    tagB64: r.tag_b64,
    encryptedPrivateKeyB64: r.encrypted_private_key_b64,
  },
});

export function insertPersonKey(db: LabDb, personId: number, k: SealedKey, createdAt: string): number {
  const info = db
    .prepare(
      `INSERT INTO person_key (person_id, public_key_pem, fingerprint, kdf, kdf_n, kdf_r, kdf_p, salt_b64, iv_b64,
         tag_b64, encrypted_private_key_b64, created_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    )
    .run(
      personId,
      k.publicKeyPem,
      k.fingerprint,
      k.kdf,
      k.kdfN,
      k.kdfR,
      k.kdfP,
      k.saltB64,
      k.ivB64,
      k.tagB64,
      k.encryptedPrivateKeyB64,
      createdAt,
    );
  if (info.changes !== 1) throw new Error(`person key: expected 1 row written, got ${info.changes}`);
  return Number(info.lastInsertRowid);
}

/** A person's newest key: the one new signatures are made with. */
export function currentKeyOf(db: LabDb, personId: number): PersonKey | undefined {
  const r = db
    .prepare('SELECT * FROM person_key WHERE person_id = ? ORDER BY id DESC LIMIT 1')
    .get(personId) as KeyRow | undefined;
  return r && rowToKey(r);
}

export function keyById(db: LabDb, keyId: number): PersonKey | undefined {
  const r = db.prepare('SELECT * FROM person_key WHERE id = ?').get(keyId) as KeyRow | undefined;
  return r && rowToKey(r);
}

export function allKeys(db: LabDb): PersonKey[] {
  return (db.prepare('SELECT * FROM person_key ORDER BY id').all() as KeyRow[]).map(rowToKey);
}

export interface SignerRow {
  person: Person;
  keyFingerprint: string;
  enrolledAt: string;
}

/** Everyone with a key, each with their newest key. */
export function listSignerRows(db: LabDb): SignerRow[] {
  const rows = db
    .prepare(
      `SELECT p.id, p.name, p.role, k.fingerprint, k.created_at FROM person p
       JOIN person_key k ON k.id = (SELECT max(id) FROM person_key WHERE person_id = p.id)
       ORDER BY p.name`,
    )
    .all() as { id: number; name: string; role: Person['role']; fingerprint: string; created_at: string }[];
  return rows.map((r) => ({
    person: { id: r.id, name: r.name, role: r.role },
    keyFingerprint: r.fingerprint,
    enrolledAt: r.created_at,
  }));
}

interface RevisionMetaRow {
  id: number;
  check_id: number;
  revision: number;
  state: RevisionSummary['state'];
  performed_on: string;
  performer_id: number;
  recorded_at: string;
  amend_reason: string | null;
  amended_by: string | null;
  traceability_exceptions_json: string | null;
  signatures: number;
}

export interface RevisionMeta {
  id: number;
  checkId: number;
  revision: number;
  state: RevisionSummary['state'];
  date: string;
  performerId: number;
  recordedAt: string;
  amendReason: string | null;
  amendedBy: string | null;
  exceptions: string[];
  signatures: number;
}

function rowToMeta(r: RevisionMetaRow): RevisionMeta {
  let exceptions: string[] = [];
  if (r.traceability_exceptions_json) {
    // A damaged value is shown as it is rather than hidden; the integrity check reports it.
    try {
      const parsed: unknown = JSON.parse(r.traceability_exceptions_json);
      exceptions = Array.isArray(parsed) ? parsed.map(String) : [String(parsed)];
    } catch {
      exceptions = [r.traceability_exceptions_json];
    }
  }
  return {
    id: r.id,
    checkId: r.check_id,
    revision: r.revision,
    state: r.state,
    date: r.performed_on,
    performerId: r.performer_id,
    recordedAt: r.recorded_at,
    amendReason: r.amend_reason,
    amendedBy: r.amended_by,
    exceptions,
    signatures: r.signatures,
  };
}

const META_SELECT = `SELECT cr.id, cr.check_id, cr.revision, cr.state, cr.performed_on, cr.performer_id, cr.recorded_at,
    cr.amend_reason, cr.amended_by, cr.traceability_exceptions_json,
    (SELECT count(*) FROM check_signature s WHERE s.revision_id = cr.id) AS signatures
  FROM check_revision cr`;

/** Every revision of a check, oldest first. */
export function revisionsOf(db: LabDb, checkId: number): RevisionMeta[] {
  return (
    db.prepare(`${META_SELECT} WHERE cr.check_id = ? ORDER BY cr.revision`).all(checkId) as RevisionMetaRow[]
  ).map(rowToMeta);
}

/** Every revision that is no longer a draft, for the integrity check. */
export function lockedRevisions(db: LabDb): RevisionMeta[] {
  return (
    db
      .prepare(`${META_SELECT} WHERE cr.state <> 'draft' ORDER BY cr.check_id, cr.revision`)
      .all() as RevisionMetaRow[]
  ).map(rowToMeta);
}

export function meterIdOfCheck(db: LabDb, checkId: number): number | undefined {
  const r = db.prepare('SELECT meter_id FROM check_event WHERE id = ?').get(checkId) as
    { meter_id: number } | undefined;
  return r?.meter_id;
}

export function standardsUsed(db: LabDb, revisionId: number, checkDate: string): StandardUsed[] {
  const rows = db
    .prepare(
      `SELECT s.asset_id, c.certificate_id, c.issued_by, c.calibrated_on, c.due_on
       FROM check_revision_standard crs JOIN standard s ON s.id = crs.standard_id
       JOIN standard_certificate c ON c.id = crs.certificate_id
       WHERE crs.revision_id = ? ORDER BY s.asset_id`,
    )
    .all(revisionId) as {
    asset_id: string;
    certificate_id: string;
    issued_by: string;
    calibrated_on: string;
    due_on: string;
  }[];
  return rows.map((r) => ({
    assetId: r.asset_id,
    certificateId: r.certificate_id,
    issuedBy: r.issued_by,
    calibratedOn: r.calibrated_on,
    dueOn: r.due_on,
    validOnCheckDate: r.calibrated_on <= checkDate && checkDate <= r.due_on,
  }));
}

/** Moves a revision's state; refuses silently-missed rows. */
export function setRevisionState(
  db: LabDb,
  revisionId: number,
  from: RevisionSummary['state'],
  to: RevisionSummary['state'],
): void {
  const info = db
    .prepare('UPDATE check_revision SET state = ? WHERE id = ? AND state = ?')
    .run(to, revisionId, from);
  if (info.changes !== 1)
    throw new Error(
      `revision ${revisionId}: expected 1 row moved from ${from} to ${to}, got ${info.changes}`,
    );
}

interface SignatureRow {
  id: number;
  revision_id: number;
  seq: number;
  person_id: number;
  key_id: number;
  printed_name: string;
  role: Person['role'];
  meaning: SignatureMeaning;
  signed_at: string;
  payload_sha256: string;
  signature_b64: string;
  fingerprint: string | null;
}

export interface StoredSignature extends CheckSignature {
  id: number;
  revisionId: number;
  personId: number;
  keyId: number;
  signatureB64: string;
}

const rowToSignature = (r: SignatureRow): StoredSignature => ({
  id: r.id,
  revisionId: r.revision_id,
  seq: r.seq,
  personId: r.person_id,
  keyId: r.key_id,
  printedName: r.printed_name,
  role: r.role,
  meaning: r.meaning,
  signedAt: r.signed_at,
  keyFingerprint: r.fingerprint ?? '(missing key)',
  payloadSha256: r.payload_sha256,
  signatureB64: r.signature_b64,
});

const SIGNATURE_SELECT = `SELECT s.*, k.fingerprint FROM check_signature s LEFT JOIN person_key k ON k.id = s.key_id`;

export function signaturesOf(db: LabDb, revisionId: number): StoredSignature[] {
  return (
    db.prepare(`${SIGNATURE_SELECT} WHERE s.revision_id = ? ORDER BY s.seq`).all(revisionId) as SignatureRow[]
  ).map(rowToSignature);
}

export function allSignatures(db: LabDb): StoredSignature[] {
  return (db.prepare(`${SIGNATURE_SELECT} ORDER BY s.revision_id, s.seq`).all() as SignatureRow[]).map(
    rowToSignature,
  );
}

export function insertSignature(db: LabDb, s: Omit<StoredSignature, 'id' | 'keyFingerprint'>): number {
  const info = db
    .prepare(
      `INSERT INTO check_signature (revision_id, seq, person_id, key_id, printed_name, role, meaning, signed_at,
         payload_sha256, signature_b64) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    )
    .run(
      s.revisionId,
      s.seq,
      s.personId,
      s.keyId,
      s.printedName,
      s.role,
      s.meaning,
      s.signedAt,
      s.payloadSha256,
      s.signatureB64,
    );
  if (info.changes !== 1) throw new Error(`signature: expected 1 row written, got ${info.changes}`);
  return Number(info.lastInsertRowid);
}

/** Where a revision row lives, for naming it in reports. */
export function revisionById(
  db: LabDb,
  revisionId: number,
): { checkId: number; revision: number } | undefined {
  const r = db.prepare('SELECT check_id, revision FROM check_revision WHERE id = ?').get(revisionId) as
    { check_id: number; revision: number } | undefined;
  return r && { checkId: r.check_id, revision: r.revision };
}

interface AuditRow {
  id: number;
  at: string;
  actor: string;
  action: string;
  entity: string;
  entity_id: string;
  before_json: string | null;
  after_json: string | null;
  prev_hash: string;
  hash: string;
  state_sha256?: string | null;
}

export interface StoredAuditEntry {
  id: number;
  at: string;
  actor: string;
  action: string;
  entity: string;
  entityId: string;
  beforeJson: string | null;
  afterJson: string | null;
  prevHash: string;
  hash: string;
  /** Digest of the entity after the change (0010 on); null on entries written before. */
  stateSha256: string | null;
}

const rowToAudit = (r: AuditRow): StoredAuditEntry => ({
  id: r.id,
  at: r.at,
  actor: r.actor,
  action: r.action,
  entity: r.entity,
  entityId: r.entity_id,
  beforeJson: r.before_json,
  afterJson: r.after_json,
  prevHash: r.prev_hash,
  hash: r.hash,
  stateSha256: r.state_sha256 ?? null,
});

function parseOrText(text: string | null): unknown {
  if (text === null) return null;
  try {
    return JSON.parse(text) as unknown;
  } catch {
    return text;
  }
}

export function listAuditEntries(
  db: LabDb,
  q: Required<Pick<AuditQuery, 'limit'>> & AuditQuery,
): AuditEntryView[] {
  // With a meter: the meter's own entries, its checks' and its issued documents' (documents are
  // named "<number> revision <n>" in the trail), in one query rather than one per check.
  const rows = cachedStatement(
    db,
    `SELECT * FROM audit_entry
     WHERE (? IS NULL OR entity = ?) AND (? IS NULL OR entity_id = ?)
       AND (? IS NULL
         OR (entity = 'meter' AND entity_id = ?)
         OR (entity = 'check' AND entity_id IN (
              SELECT CAST(ce.id AS TEXT) FROM check_event ce JOIN meter m ON m.id = ce.meter_id
              WHERE m.asset_id = ?))
         OR (entity = 'document' AND entity_id IN (
              SELECT d.number || ' revision ' || d.revision FROM issued_document d
              JOIN check_revision cr ON cr.id = d.check_revision_id
              JOIN check_event ce ON ce.id = cr.check_id JOIN meter m ON m.id = ce.meter_id
              WHERE m.asset_id = ?)))
     ORDER BY id DESC LIMIT ?`,
  ).all(
    q.entity ?? null,
    q.entity ?? null,
    q.entityId ?? null,
    q.entityId ?? null,
    q.meter ?? null,
    q.meter ?? null,
    q.meter ?? null,
    q.meter ?? null,
    q.limit,
  ) as AuditRow[];
  return rows.map((r) => ({
    id: r.id,
    at: r.at,
    actor: r.actor,
    action: r.action,
    entity: r.entity,
    entityId: r.entity_id,
    before: parseOrText(r.before_json),
    after: parseOrText(r.after_json),
    hash: r.hash,
  }));
}

/** The trail oldest first, one row at a time (a lab's trail grows for decades). */
export function* auditEntries(db: LabDb): Generator<StoredAuditEntry> {
  for (const r of db.prepare('SELECT * FROM audit_entry ORDER BY id').iterate() as IterableIterator<AuditRow>)
    yield rowToAudit(r);
}

/** SQLite's own check of the file's structure: ['ok'] when sound. */
export function sqliteIntegrity(db: LabDb): string[] {
  return (db.pragma('integrity_check') as { integrity_check: string }[]).map((r) => r.integrity_check);
}
