// Records that hold up in an audit: enrolling signers, signing a check's revision (performer,
// then reviewer, then optionally an approver), amending as a new revision with a reason, the
// audit trail, and the integrity check of the whole file.
//
// Sources: 21 CFR Part 11 sections 11.50 (name, date and time, meaning shown with a
// signature), 11.70 (a signature linked to its record so it cannot be moved), 11.200(a)(1) (two
// distinct components: who you are and your passphrase); ISO/IEC 17025:2017 7.5.2 (amendments
// keep the original and say what changed, by whom, when); RFC 8785 (canonical JSON); RFC 8032
// (Ed25519).
import { z } from 'zod';
import { appendAudit, auditHash, GENESIS_HASH } from '../../../db/queries/audit';
import { getCheck, insertRevision } from '../../../db/queries/checks';
import { insertSweeps } from '../../../db/queries/sweeps';
import { revisionRows, sweepRows } from '../checks/rows';
import { findPersonByName, insertPerson } from '../../../db/queries/people';
import {
  allKeys,
  allSignatures,
  auditEntries,
  currentKeyOf,
  insertPersonKey,
  insertSignature,
  keyById,
  listAuditEntries,
  listSignerRows,
  lockedRevisions,
  meterIdOfCheck,
  revisionById,
  revisionsOf,
  setRevisionState,
  signaturesOf,
  sqliteIntegrity,
  standardsUsed,
  type RevisionMeta,
  type StoredSignature,
} from '../../../db/queries/records';
import type { LabDb } from '../../../db/store';
import { prepareCheck } from '../checks/prepare';
import type { OpGroup, ServiceContext } from './context';
import { requireLab } from './lookups';
import type { Person } from '../contract';
import type {
  CheckRevisionView,
  IntegrityProblem,
  IntegrityReport,
  RecordsApi,
  SignatureMeaning,
  Signer,
} from '../contract-records';
import { comparable, diffValues } from '../records-diff';
import {
  MIN_PASSPHRASE_LENGTH,
  canonicalBytes,
  fingerprintOf,
  generateSealedKey,
  sha256Hex,
  signBytes,
  unsealPrivateKey,
  verifyBytes,
} from '../records-signing';
import { LabError, describe } from '../errors';
import { parseWith } from '../issues';

const MEANINGS: SignatureMeaning[] = ['performed', 'reviewed', 'approved'];

const nonEmpty = (what: string, max: number) =>
  z
    .string(`expected ${what}`)
    .trim()
    .min(1, `expected ${what}, not empty`)
    .max(max, `expected ${what} of at most ${max} characters`);
const CheckIdSchema = z
  .int('expected a check number such as 12')
  .min(1, 'expected a check number such as 12');

const EnrolSchema = z.object({
  name: nonEmpty('a name', 80),
  role: z
    .enum(['technician', 'reviewer', 'administrator'], 'expected technician, reviewer or administrator')
    .optional(),
  passphrase: z.unknown(),
});
const SignSchema = z.object({
  checkId: CheckIdSchema,
  person: nonEmpty("the signer's name", 80),
  passphrase: z.unknown(),
  meaning: z.enum(MEANINGS, 'expected performed, reviewed or approved').optional(),
});
const AmendSchema = z.object({
  checkId: CheckIdSchema,
  reason: nonEmpty('the reason for the amendment', 1000).pipe(
    z.string().min(3, 'expected a reason of a few words'),
  ),
  document: z.unknown(),
});
const RevisionQuerySchema = z.object({
  checkId: CheckIdSchema,
  revision: z
    .int('expected a revision number such as 2')
    .min(1, 'expected a revision number such as 2')
    .optional(),
});
const AuditQuerySchema = z.object({
  entity: z.string('expected an entity such as "check"').max(40).optional(),
  entityId: z.string('expected an entity id as text').max(80).optional(),
  meter: z.string('expected a meter asset id').trim().min(1, 'expected a meter asset id').max(80).optional(),
  limit: z.int('expected a whole number of entries').min(1).max(10000).default(100),
});

/** Passphrases are checked by hand so a refusal never repeats the value given. */
function passphraseOf(value: unknown, forNewKey: boolean): string {
  const hidden = value === undefined ? undefined : '(hidden)';
  if (typeof value !== 'string' || value.length === 0)
    throw LabError.field(
      'passphrase',
      hidden,
      'a passphrase',
      'passphrase: missing; expected the passphrase',
    );
  if (value.length > 1024)
    throw LabError.field(
      'passphrase',
      hidden,
      'at most 1024 characters',
      'passphrase: longer than 1024 characters',
    );
  if (forNewKey && [...value].length < MIN_PASSPHRASE_LENGTH)
    throw LabError.field(
      'passphrase',
      hidden,
      `at least ${MIN_PASSPHRASE_LENGTH} characters`,
      `passphrase: too short; expected at least ${MIN_PASSPHRASE_LENGTH} characters`,
    );
  // A lone surrogate cannot be normalized or encoded the same way twice.
  if (/[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/.test(value))
    throw LabError.field('passphrase', hidden, 'text', 'passphrase: contains characters that are not text');
  return value;
}

/** Who may give each meaning: the performer named in the record performs; reviewers and
 * administrators review and approve (common practice in calibration labs; no source). */
function mayGive(meaning: SignatureMeaning, person: Person, performerId: number): string | undefined {
  if (meaning === 'performed')
    return person.id === performerId ? undefined : 'the performer named in the check';
  return person.role === 'reviewer' || person.role === 'administrator'
    ? undefined
    : 'a reviewer or administrator';
}

/** Everything about one revision that its signatures cover, field by field under a named
 * format, so a field added to CheckRecord later does not change what old signatures cover.
 * State is left out: a signed revision later marked "amended" must still verify. */
function signedContent(db: LabDb, meta: RevisionMeta): unknown {
  const r = getCheck(db, meta.checkId, meta.revision);
  if (!r) throw new Error(`check ${meta.checkId} revision ${meta.revision} cannot be read`);
  return {
    format: 'dipledger.check-record/1',
    record: {
      checkId: r.checkId,
      revision: r.revision,
      meterAssetId: r.meterAssetId,
      date: r.date,
      performer: r.performer,
      standards: r.standards,
      method: r.method,
      conditions: r.conditions,
      adjusted: r.adjusted,
      remarks: r.remarks,
      engineVersion: r.engineVersion,
      points: r.points.map((p) => ({
        seq: p.seq,
        phase: p.phase,
        referenceHz: p.referenceHz,
        standardAssetId: p.standardAssetId,
        readings: p.readings.map((x) => ({ value: x.value, direction: x.direction })),
        dipDepthDb: p.dipDepthDb,
        result: p.result,
      })),
      asFoundVerdict: r.asFoundVerdict,
      asLeftVerdict: r.asLeftVerdict,
      recordedAt: r.recordedAt,
    },
    amendment: meta.amendReason === null ? null : { reason: meta.amendReason, by: meta.amendedBy },
    standardsUsed: standardsUsed(db, meta.id, meta.date).map((s) => ({
      assetId: s.assetId,
      certificateId: s.certificateId,
      issuedBy: s.issuedBy,
      calibratedOn: s.calibratedOn,
      dueOn: s.dueOn,
    })),
    traceabilityExceptions: meta.exceptions,
  };
}

interface SignatureFields {
  printedName: string;
  role: Person['role'];
  meaning: SignatureMeaning;
  signedAt: string;
  keyFingerprint: string;
}

/** The bytes a signature covers: the whole revision, the manifestation shown with the
 * signature, and the signatures before it on the same revision (so a review covers the
 * performer's signature too). Canonical per RFC 8785, so they can be rebuilt years later. */
function payloadBytes(content: unknown, s: SignatureFields, before: StoredSignature[]): Buffer {
  return canonicalBytes({
    format: 'dipledger.signature/1',
    content,
    signer: { printedName: s.printedName, role: s.role, keyFingerprint: s.keyFingerprint },
    meaning: s.meaning,
    signedAt: s.signedAt,
    previous: before.map((p) => ({ seq: p.seq, meaning: p.meaning, signature: p.signatureB64 })),
  });
}

function nextMeaning(signatures: StoredSignature[]): SignatureMeaning | null {
  return MEANINGS[signatures.length] ?? null;
}

export function revisionView(ctx: ServiceContext, checkId: number, revision?: number): CheckRevisionView {
  const { db } = ctx;
  const revisions = revisionsOf(db, checkId);
  if (revisions.length === 0) throw new LabError('not-found', `no check ${checkId} in this lab`);
  const signed = revisions.filter((r) => r.state !== 'draft');
  const effective = signed[signed.length - 1] ?? null;
  const meta =
    revision === undefined
      ? (effective ?? revisions[revisions.length - 1])
      : revisions.find((r) => r.revision === revision);
  if (!meta)
    throw LabError.field(
      'revision',
      revision,
      `a revision of check ${checkId} (1 to ${revisions.length})`,
      `revision: check ${checkId} has no revision ${describe(revision)} (it has 1 to ${revisions.length})`,
    );
  const record = getCheck(db, checkId, meta.revision);
  if (!record) throw new LabError('internal', `check ${checkId} revision ${meta.revision} cannot be read`);
  const used = standardsUsed(db, meta.id, meta.date);
  const signatures = signaturesOf(db, meta.id);
  const previousMeta = revisions.find((r) => r.revision === meta.revision - 1);
  const previous = previousMeta && getCheck(db, checkId, previousMeta.revision);
  const changes =
    previousMeta && previous
      ? diffValues(
          comparable(previous, {
            standardsUsed: standardsUsed(db, previousMeta.id, previousMeta.date),
            exceptions: previousMeta.exceptions,
          }),
          comparable(record, { standardsUsed: used, exceptions: meta.exceptions }),
        )
      : [];
  const newest = revisions[revisions.length - 1];
  return {
    record,
    effectiveRevision: effective?.revision ?? null,
    revisions: revisions.map((r) => ({
      revision: r.revision,
      state: r.state,
      recordedAt: r.recordedAt,
      amendReason: r.amendReason,
      amendedBy: r.amendedBy,
      signatures: r.signatures,
    })),
    amendment:
      meta.amendReason === null
        ? null
        : { reason: meta.amendReason, by: meta.amendedBy ?? '', at: meta.recordedAt },
    signatures: signatures.map(
      ({ id: _i, revisionId: _r, personId: _p, keyId: _k, signatureB64: _s, ...s }) => s,
    ),
    // Approval is optional: a revision performed and reviewed waits for nothing more.
    awaiting: meta === newest && signatures.length < 2 ? nextMeaning(signatures) : null,
    standardsUsed: used,
    traceabilityExceptions: meta.exceptions,
    changes,
  };
}

/** Every check of the lab file: SQLite's structure check, the audit chain link by link, every
 * signature against the record it covers, each key against the trail entry that enrolled it,
 * and that every locked revision carries its performer's signature. */
export function integrityReport(db: LabDb): IntegrityReport {
  const problems: IntegrityProblem[] = [];
  const sqlite = sqliteIntegrity(db);
  if (!(sqlite.length === 1 && sqlite[0] === 'ok'))
    problems.push({
      kind: 'sqlite',
      record: 'the lab file',
      problem: sqlite.slice(0, 5).join('; '),
      affects: 'the whole file: restore the newest backup that passes this check',
    });

  // The chain: each entry's hash over its fields and the hash before it.
  let prev = GENESIS_HASH;
  let entries = 0;
  let broken: { index: number; problem: IntegrityProblem } | undefined;
  const enrolled = new Map<string, string>();
  for (const e of auditEntries(db)) {
    entries += 1;
    if (e.entity === 'person-key') enrolled.set(e.entityId, e.afterJson ?? '');
    if (broken) continue;
    const recomputed = auditHash(
      e.prevHash,
      e.at,
      e.actor,
      e.action,
      e.entity,
      e.entityId,
      e.beforeJson,
      e.afterJson,
    );
    const problem =
      e.prevHash !== prev
        ? 'does not follow the entry before it (an entry was removed, inserted or changed before it)'
        : recomputed !== e.hash
          ? 'its content no longer matches its hash (the entry was edited)'
          : undefined;
    if (problem)
      broken = {
        index: entries,
        problem: {
          kind: 'audit',
          record: `audit entry ${e.id}`,
          problem: `audit entry ${e.id} (${e.action} ${e.entity} ${e.entityId} at ${e.at}) ${problem}`,
          affects: `the trail of ${e.entity} ${e.entityId}, and the entries after it`,
        },
      };
    prev = e.hash;
  }
  if (broken) {
    const after = entries - broken.index;
    broken.problem.affects = `${broken.problem.affects} (${after} later entr${after === 1 ? 'y' : 'ies'}) can no longer be trusted through the chain`;
    problems.push(broken.problem);
  }

  for (const k of allKeys(db)) {
    let problem: string | undefined;
    try {
      if (fingerprintOf(k.sealed.publicKeyPem) !== k.sealed.fingerprint)
        problem = 'its public key does not match its fingerprint';
    } catch {
      problem = 'its public key cannot be read';
    }
    const trail = enrolled.get(String(k.id));
    if (!problem && (trail === undefined || !trail.includes(k.sealed.fingerprint)))
      problem = 'it does not match the audit entry that enrolled it';
    if (problem)
      problems.push({
        kind: 'key',
        record: `signing key ${k.id} of person ${k.personId}`,
        problem: `signing key ${k.id}: ${problem}`,
        affects: 'every signature made with this key',
      });
  }

  const metaById = new Map<number, RevisionMeta>();
  const contentOf = new Map<number, unknown>();
  const bySignatureRevision = new Map<number, StoredSignature[]>();
  let checked = 0;
  for (const s of allSignatures(db)) {
    checked += 1;
    const list = bySignatureRevision.get(s.revisionId) ?? [];
    const at = revisionById(db, s.revisionId);
    const name = at ? `check ${at.checkId} revision ${at.revision}` : `revision row ${s.revisionId}`;
    const fail = (problem: string) =>
      problems.push({
        kind: 'signature',
        record: name,
        problem: `${name}: the ${s.meaning} signature of ${s.printedName} (${s.signedAt}) ${problem}`,
        affects: `${name} cannot be trusted as signed`,
      });
    try {
      if (!at) throw new Error('its revision is missing');
      let meta = metaById.get(s.revisionId);
      if (!meta) {
        meta = revisionsOf(db, at.checkId).find((r) => r.id === s.revisionId);
        if (!meta) throw new Error('its revision is missing');
        metaById.set(s.revisionId, meta);
      }
      if (!contentOf.has(s.revisionId)) contentOf.set(s.revisionId, signedContent(db, meta));
      const key = keyById(db, s.keyId);
      if (!key) throw new Error('its key is missing');
      const bytes = payloadBytes(
        contentOf.get(s.revisionId),
        { ...s, keyFingerprint: key.sealed.fingerprint },
        list.filter((p) => p.seq < s.seq),
      );
      if (
        sha256Hex(bytes) !== s.payloadSha256 ||
        !verifyBytes(key.sealed.publicKeyPem, bytes, s.signatureB64)
      )
        fail('does not match the record: the record or the signature was changed after signing');
    } catch (e) {
      fail(`cannot be checked: ${e instanceof Error ? e.message : String(e)}`);
    }
    list.push(s);
    bySignatureRevision.set(s.revisionId, list);
  }

  // A locked revision with no performer's signature was locked outside the app.
  for (const meta of lockedRevisions(db)) {
    const first = bySignatureRevision.get(meta.id)?.[0];
    if (!first || first.meaning !== 'performed')
      problems.push({
        kind: 'lock',
        record: `check ${meta.checkId} revision ${meta.revision}`,
        problem: `check ${meta.checkId} revision ${meta.revision} is ${meta.state} but has no performer's signature`,
        affects: `check ${meta.checkId} revision ${meta.revision} cannot be trusted as signed`,
      });
  }
  for (const [revisionId, list] of bySignatureRevision) {
    const at = revisionById(db, revisionId);
    const meta = at && revisionsOf(db, at.checkId).find((r) => r.id === revisionId);
    if (meta && meta.state === 'draft' && list.length > 0)
      problems.push({
        kind: 'lock',
        record: `check ${meta.checkId} revision ${meta.revision}`,
        problem: `check ${meta.checkId} revision ${meta.revision} is signed but marked as an editable draft`,
        affects: `check ${meta.checkId} revision ${meta.revision} may have been changed after signing`,
      });
  }

  return {
    ok: problems.length === 0,
    sqlite,
    auditEntries: entries,
    auditHead: prev,
    signaturesChecked: checked,
    problems,
  };
}

function signerOf(ctx: ServiceContext, person: Person): Signer {
  const key = currentKeyOf(ctx.db, person.id);
  if (!key) throw new LabError('internal', `no key for ${person.name} after enrolling`);
  return { person, keyFingerprint: key.sealed.fingerprint, enrolledAt: key.createdAt };
}

/** Checks who may sign what on the newest revision of a check; reads only. */
function planSignature(
  ctx: ServiceContext,
  checkId: number,
  person: Person,
  wanted: SignatureMeaning | undefined,
) {
  const revisions = revisionsOf(ctx.db, checkId);
  const meta = revisions[revisions.length - 1];
  if (!meta) throw new LabError('not-found', `no check ${checkId} in this lab`);
  const before = signaturesOf(ctx.db, meta.id);
  const meaning = nextMeaning(before);
  const where = `check ${checkId} revision ${meta.revision}`;
  if (!meaning)
    throw new LabError(
      'refused',
      `${where} is already performed, reviewed and approved: nothing left to sign`,
    );
  if (wanted && wanted !== meaning)
    throw LabError.field(
      'meaning',
      wanted,
      `"${meaning}", the next signature due`,
      `meaning: ${where} waits for its "${meaning}" signature before "${wanted}"`,
    );
  const who = mayGive(meaning, person, meta.performerId);
  if (who)
    throw LabError.field(
      'person',
      person.name,
      who,
      `person: ${person.name} cannot sign "${meaning}" on ${where}: that takes ${who}`,
    );
  if (requireLab(ctx).signersMustDiffer && before.some((s) => s.personId === person.id))
    throw LabError.field(
      'person',
      person.name,
      'someone who has not signed this revision',
      `person: ${person.name} already signed ${where}; the lab requires a different reviewer`,
    );
  return { meta, before, meaning, where };
}

export function enrolSigner(ctx: ServiceContext, input: Parameters<RecordsApi['enrolSigner']>[0]) {
  const e = parseWith(EnrolSchema, input);
  const passphrase = passphraseOf((input as { passphrase?: unknown } | null)?.passphrase, true);
  const existing = findPersonByName(ctx.db, e.name);
  if (existing && currentKeyOf(ctx.db, existing.id))
    throw new LabError('conflict', `${existing.name} already has a signing key`, [
      {
        field: 'name',
        value: e.name,
        expected: 'a person without a signing key',
        message: `name: ${existing.name} already has a signing key`,
      },
    ]);
  if (existing && e.role && e.role !== existing.role)
    throw LabError.field(
      'role',
      e.role,
      `${existing.role}, the role ${existing.name} has`,
      `role: ${existing.name} is a ${existing.role}, not a ${e.role}`,
    );
  if (!existing && !e.role)
    throw LabError.field(
      'role',
      undefined,
      'technician, reviewer or administrator',
      `role: missing; ${e.name} is new to the lab, so give a role`,
    );
  const sealed = generateSealedKey(passphrase);
  let person = existing;
  ctx.db.transaction(() => {
    const at = ctx.clock.now();
    if (!person) {
      const p = { name: e.name, role: e.role as Person['role'] };
      person = insertPerson(ctx.db, p, at);
      appendAudit(ctx.db, {
        at,
        actor: ctx.actor,
        action: 'create',
        entity: 'person',
        entityId: String(person.id),
        before: undefined,
        after: p,
      });
    }
    const keyId = insertPersonKey(ctx.db, person.id, sealed, at);
    appendAudit(ctx.db, {
      at,
      actor: ctx.actor,
      action: 'create',
      entity: 'person-key',
      entityId: String(keyId),
      before: undefined,
      after: {
        person: person.name,
        personId: person.id,
        fingerprint: sealed.fingerprint,
        publicKeyPem: sealed.publicKeyPem,
      },
    });
  })();
  return signerOf(ctx, person as Person);
}

export function listSigners(ctx: ServiceContext) {
  return listSignerRows(ctx.db);
}

export function signCheck(ctx: ServiceContext, input: Parameters<RecordsApi['signCheck']>[0]) {
  const s = parseWith(SignSchema, input);
  const passphrase = passphraseOf((input as { passphrase?: unknown } | null)?.passphrase, false);
  const person = findPersonByName(ctx.db, s.person);
  if (!person)
    throw new LabError('not-found', `person: ${describe(s.person)} is not one of the lab's people`, [
      {
        field: 'person',
        value: s.person,
        expected: "one of the lab's people",
        message: `person: ${describe(s.person)} is not one of the lab's people`,
      },
    ]);
  const key = currentKeyOf(ctx.db, person.id);
  if (!key)
    throw LabError.field(
      'person',
      person.name,
      'a person with a signing key',
      `person: ${person.name} has no signing key yet ("dipledger person add")`,
    );
  planSignature(ctx, s.checkId, person, s.meaning);
  // The passphrase is tried only after every cheaper refusal, and a wrong one writes nothing.
  const privateKey = unsealPrivateKey(key.sealed, passphrase);
  if (!privateKey)
    throw new LabError(
      'refused',
      `the passphrase does not open ${person.name}'s signing key: nothing was signed`,
      [
        {
          field: 'passphrase',
          value: '(hidden)',
          expected: `${person.name}'s passphrase`,
          message: 'passphrase: not the passphrase of this signing key; nothing was signed',
        },
      ],
    );
  let signed: { checkId: number; revision: number } | undefined;
  ctx.db.transaction(() => {
    // Planned again inside the write lock: another process may have signed meanwhile.
    const { meta, before, meaning, where } = planSignature(ctx, s.checkId, person, s.meaning);
    const signedAt = ctx.clock.now();
    const fields = {
      printedName: person.name,
      role: person.role,
      meaning,
      signedAt,
      keyFingerprint: key.sealed.fingerprint,
    };
    const bytes = payloadBytes(signedContent(ctx.db, meta), fields, before);
    const signatureB64 = signBytes(privateKey, bytes);
    if (!verifyBytes(key.sealed.publicKeyPem, bytes, signatureB64))
      throw new LabError('internal', `${where}: the new signature does not verify; nothing was signed`);
    insertSignature(ctx.db, {
      revisionId: meta.id,
      seq: before.length + 1,
      personId: person.id,
      keyId: key.id,
      printedName: person.name,
      role: person.role,
      meaning,
      signedAt,
      payloadSha256: sha256Hex(bytes),
      signatureB64,
    });
    if (meta.state === 'draft') {
      setRevisionState(ctx.db, meta.id, 'draft', 'signed');
      // The newest signed revision is the effective one; earlier signed ones are superseded.
      for (const older of revisionsOf(ctx.db, meta.checkId))
        if (older.revision < meta.revision && older.state === 'signed')
          setRevisionState(ctx.db, older.id, 'signed', 'amended');
    }
    appendAudit(ctx.db, {
      at: signedAt,
      actor: ctx.actor,
      action: 'sign',
      entity: 'check',
      entityId: String(meta.checkId),
      before: { revision: meta.revision, state: meta.state, signatures: before.length },
      after: {
        revision: meta.revision,
        state: 'signed',
        signature: { ...fields, payloadSha256: sha256Hex(bytes) },
      },
    });
    signed = { checkId: meta.checkId, revision: meta.revision };
  })();
  const done = signed as { checkId: number; revision: number };
  return revisionView(ctx, done.checkId, done.revision);
}

export function amendCheck(ctx: ServiceContext, input: Parameters<RecordsApi['amendCheck']>[0]) {
  const a = parseWith(AmendSchema, input);
  const revisions = revisionsOf(ctx.db, a.checkId);
  const newest = revisions[revisions.length - 1];
  if (!newest) throw new LabError('not-found', `no check ${a.checkId} in this lab`);
  const prepared = prepareCheck(ctx, a.document, 'document', {
    createPerformer: false,
    amendingCheckId: a.checkId,
  });
  if (prepared.meter.id !== meterIdOfCheck(ctx.db, a.checkId)) {
    const was = getCheck(ctx.db, a.checkId)?.meterAssetId ?? '?';
    throw LabError.field(
      'document.meter',
      prepared.meter.meter.assetId,
      `${was}, the meter of check ${a.checkId}`,
      `document.meter: check ${a.checkId} is of ${was}; an amendment cannot move it to ${prepared.meter.meter.assetId}`,
    );
  }
  const performer = prepared.performer as Person;
  const revision = newest.revision + 1;
  ctx.db.transaction(() => {
    const at = ctx.clock.now();
    // Re-read inside the write lock, so two amendments at once cannot take the same number.
    const latest = revisionsOf(ctx.db, a.checkId).at(-1)?.revision ?? 0;
    if (latest !== newest.revision)
      throw new LabError(
        'conflict',
        `check ${a.checkId} was amended meanwhile (now revision ${latest}); look at it and try again`,
      );
    insertRevision(
      ctx.db,
      a.checkId,
      revision,
      revisionRows(prepared, performer.id, requireLab(ctx).decisionRule, { reason: a.reason, by: ctx.actor }),
      at,
    );
    // Swept points keep their raw trace and fit in the new revision too.
    insertSweeps(ctx.db, a.checkId, sweepRows(prepared));
    const view = revisionView(ctx, a.checkId, revision);
    if (view.changes.length === 0)
      throw LabError.field(
        'document',
        undefined,
        'a document that changes something',
        `document: the same as revision ${newest.revision} of check ${a.checkId}; nothing to amend`,
      );
    appendAudit(ctx.db, {
      at,
      actor: ctx.actor,
      action: 'amend',
      entity: 'check',
      entityId: String(a.checkId),
      before: { revision: newest.revision, state: newest.state },
      after: { revision, reason: a.reason, changes: view.changes },
    });
  })();
  return revisionView(ctx, a.checkId, revision);
}

export function getCheckRevision(ctx: ServiceContext, query: Parameters<RecordsApi['getCheckRevision']>[0]) {
  const q = parseWith(RevisionQuerySchema, query);
  return revisionView(ctx, q.checkId, q.revision);
}

export function listAudit(ctx: ServiceContext, query: Parameters<RecordsApi['listAudit']>[0]) {
  const q = parseWith(AuditQuerySchema, query ?? {});
  return listAuditEntries(ctx.db, q);
}

export function verifyIntegrity(ctx: ServiceContext) {
  return integrityReport(ctx.db);
}

export const signingOps = {
  enrolSigner,
  listSigners,
  signCheck,
  amendCheck,
  getCheckRevision,
  listAudit,
  verifyIntegrity,
} satisfies OpGroup<keyof RecordsApi>;
