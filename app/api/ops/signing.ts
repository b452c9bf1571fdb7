// Signing: enrolling signers, signing a check's revision (performer, then reviewer, then
// optionally an approver), and amending as a new revision with a reason.
//
// Sources: 21 CFR Part 11 sections 11.50 (name, date and time, meaning shown with a
// signature), 11.70 (a signature linked to its record so it cannot be moved), 11.200(a)(1) (two
// distinct components: who you are and your passphrase); ISO/IEC 17025:2017 7.5.2 (amendments
// keep the original and say what changed, by whom, when); RFC 8785 (canonical JSON); RFC 8032
// (Ed25519).
import { z } from 'zod';
import { appendAudit } from '../../../db/queries/audit';
import { getCheck, insertRevision } from '../../../db/queries/checks';
import { insertSweeps } from '../../../db/queries/sweeps';
import { revisionRows, sweepRows } from '../checks/rows';
import { findPersonByName, insertPerson } from '../../../db/queries/people';
import {
  currentKeyOf,
  insertPersonKey,
  insertSignature,
  listSignerRows,
  meterIdOfCheck,
  revisionsOf,
  setRevisionState,
  signaturesOf,
  standardsUsed,
  type StoredSignature,
} from '../../../db/queries/records';
import { revisionSignedContent } from '../../../db/queries/signed-content';
import { signaturePayload } from '../../signing/payload';
import { prepareCheck } from '../checks/prepare';
import type { OpGroup, ServiceContext } from './context';
import { requireLab } from './lookups';
import {
  LOCK_AFTER_FAILURES,
  LOCK_MINUTES,
  LOCKED_OUT,
  recordRefusedAttempt,
  signingLockedUntil,
  WRONG_PASSPHRASE,
} from './sign-attempts';
import type { Person } from '../contract';
import type { CheckRevisionView, RecordsApi, SignatureMeaning, Signer } from '../contract-records';
import { comparable, diffValues } from '../records-diff';
import {
  MIN_PASSPHRASE_LENGTH,
  generateSealedKey,
  sha256Hex,
  signBytes,
  unsealPrivateKey,
  verifyBytes,
} from '../../signing/keys';
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
const RekeySchema = z.object({ name: nonEmpty('a name', 80), passphrase: z.unknown() });
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

/** A new key for someone who already signs (a forgotten passphrase): a new row, the old key kept
 * so the signatures made with it still verify. */
export function rekeySigner(ctx: ServiceContext, input: unknown) {
  const e = parseWith(RekeySchema, input);
  const passphrase = passphraseOf((input as { passphrase?: unknown } | null)?.passphrase, true);
  const person = findPersonByName(ctx.db, e.name);
  if (!person)
    throw LabError.field(
      'name',
      e.name,
      "one of the lab's people",
      `name: ${describe(e.name)} is not one of the lab's people`,
    );
  if (person.leftOn)
    throw LabError.field(
      'name',
      e.name,
      'someone still in the lab',
      `name: ${person.name} left the lab on ${person.leftOn}`,
    );
  const old = currentKeyOf(ctx.db, person.id);
  if (!old)
    throw LabError.field(
      'name',
      e.name,
      'a person with a signing key',
      `name: ${person.name} has no signing key yet ("dipledger person add")`,
    );
  const sealed = generateSealedKey(passphrase);
  ctx.db.transaction(() => {
    const at = ctx.clock.now();
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
        replaces: old.sealed.fingerprint,
      },
    });
  })();
  return signerOf(ctx, person);
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
  if (person.leftOn)
    throw LabError.field(
      'person',
      person.name,
      'someone still in the lab',
      `person: ${person.name} left the lab on ${person.leftOn} and cannot sign again`,
    );
  const key = currentKeyOf(ctx.db, person.id);
  if (!key)
    throw LabError.field(
      'person',
      person.name,
      'a person with a signing key',
      `person: ${person.name} has no signing key yet ("dipledger person add")`,
    );
  const planned = planSignature(ctx, s.checkId, person, s.meaning);
  // A person with too many wrong passphrases lately is refused before the passphrase is tried.
  const lockedUntil = signingLockedUntil(ctx, person.id);
  if (lockedUntil) {
    recordRefusedAttempt(ctx, person, s.checkId, planned.meaning, LOCKED_OUT);
    throw new LabError(
      'refused',
      `${person.name} may not sign until ${lockedUntil}: ${LOCK_AFTER_FAILURES} wrong passphrases within ${LOCK_MINUTES} minutes; nothing was signed`,
    );
  }
  // The passphrase is tried only after every cheaper refusal; a wrong one writes nothing but the
  // refused attempt in the audit trail (who, which check and meaning, when, why; never the
  // passphrase).
  const privateKey = unsealPrivateKey(key.sealed, passphrase);
  if (!privateKey) {
    recordRefusedAttempt(ctx, person, s.checkId, planned.meaning, WRONG_PASSPHRASE);
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
  }
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
    const bytes = signaturePayload(revisionSignedContent(ctx.db, meta), fields, before);
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

export const signingOps = {
  enrolSigner,
  listSigners,
  signCheck,
  rekeySigner,
  amendCheck,
  getCheckRevision,
} satisfies OpGroup<
  'enrolSigner' | 'listSigners' | 'signCheck' | 'rekeySigner' | 'amendCheck' | 'getCheckRevision'
>;
