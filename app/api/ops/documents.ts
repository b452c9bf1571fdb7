// The documents group of the LabApi: issuing certificates and check-sheets from the effective
// (newest signed) revision of a check, the bench worksheet, the list of issued documents, and
// verification of a received PDF against this lab's records.
//
// Rendering is synchronous (pdfkit writes the whole file during end()), but every issued
// document is signed as a PDF (the lab's document key, or its PKCS#12), and the signing library
// is asynchronous: an issue returns a promise, which the service's async wrapper adopts
// (Promise.resolve); the number is re-checked inside the single write transaction, so two
// overlapping issues can never share a number.
import { X509Certificate } from 'node:crypto';
import { z } from 'zod';
import { appendAudit, auditHeadOf } from '../../../db/queries/audit';
import { documentKeyFingerprints } from '../../../db/queries/document-keys';
import { getCheck } from '../../../db/queries/checks';
import {
  currentDocumentOfCheck,
  documentSignatureB64s,
  findIssuedDocument,
  findIssuedDocumentBySha256,
  insertIssuedDocument,
  issuedDocumentById,
  listIssuedDocuments,
  nextDocumentNumber,
  type IssuedDocumentRecord,
} from '../../../db/queries/documents';
import { listPeople } from '../../../db/queries/people';
import {
  allKeys,
  keyById,
  revisionsOf,
  signaturesOf,
  standardsUsed,
  type RevisionMeta,
} from '../../../db/queries/records';
import { listStandards, type StandardRecord } from '../../../db/queries/standards';
import { renderCertificate, signRendered, type RenderedDocument } from '../../documents/certificate';
import { renderCheckSheet } from '../../documents/checksheet';
import type {
  CheckDocumentData,
  DocumentKind,
  DocumentSignature,
  IntervalSuggestion,
  StandardUsed,
} from '../../documents/model';
import { sha256Hex } from '../../documents/record';
import { signaturePayload, signaturesBefore } from '../../documents/signatures';
import { verifyDocumentBytes, type IssuedEvidence, type LabEvidence } from '../../documents/verify';
import { renderWorksheet } from '../../documents/worksheet';
import { revisionSignedContent } from '../../../db/queries/signed-content';
import type { DocumentSigner } from '../../signing/document-key';
import type { OpGroup, ServiceContext } from './context';
import {
  ensureLabDocumentKey,
  keepSigningCertificate,
  labDocumentSigner,
  pkcs12DocumentSigner,
} from './document-keys';
import { getTrend } from './history';
import { requireLab, requireMeter } from './lookups';
import type { Standard } from '../contract';
import type {
  DocumentCertificate,
  DocumentsApi,
  IssuedDocument,
  IssuedDocumentFile,
} from '../contract-documents';
import { LabError, describe } from '../errors';
import { parseWith } from '../issues';

const IssueSchema = z.object({
  checkId: z
    .number('expected a check number')
    .int('expected a whole check number')
    .positive('expected a check number'),
  replaceReason: z.string().trim().min(3, 'expected a reason of at least a few words').max(2000).optional(),
  pdfSignature: z
    .object({
      p12Base64: z.string().min(1, 'expected the PKCS#12 file as base64'),
      passphrase: z.string(),
    })
    .optional(),
});

const VerifySchema = z.object({
  pdfBase64: z.string().min(1, 'expected the PDF as base64'),
});

const QuerySchema = z
  .object({
    meter: z.string().optional(),
    checkId: z.number().int().positive().optional(),
  })
  .optional();

function toIssued(ctx: ServiceContext, d: IssuedDocumentRecord): IssuedDocument {
  const replaced = d.replacesId === null ? undefined : issuedDocumentById(ctx.db, d.replacesId);
  const replacedBy = d.replacedById === null ? undefined : issuedDocumentById(ctx.db, d.replacedById);
  return {
    kind: d.kind,
    number: d.number,
    revision: d.revision,
    meterAssetId: d.meterAssetId,
    checkId: d.checkId,
    checkRevision: d.checkRevision,
    issuedAt: d.issuedAt,
    issuedBy: d.issuedBy,
    sha256: d.sha256,
    recordSha256: d.recordSha256,
    recordName: d.recordName,
    byteLength: d.byteLength,
    pdfSigned: d.pades,
    intervalPrinted: d.intervalPrinted,
    signatures: documentSignatureB64s(ctx.db, d.id).length,
    replaces: replaced
      ? { number: replaced.number, revision: replaced.revision, reason: d.replaceReason ?? '' }
      : null,
    replacedBy: replacedBy ? { number: replacedBy.number, revision: replacedBy.revision } : null,
  };
}

function toStandard(ctx: ServiceContext, s: StandardRecord): Standard {
  const newest = s.certificates[0];
  const dueOn = newest?.dueOn ?? '';
  const today = ctx.clock.today();
  const days = dueOn ? Math.round((Date.parse(dueOn) - Date.parse(today)) / 86_400_000) : 0;
  return {
    assetId: s.assetId,
    description: s.description,
    kind: s.kind,
    minHz: s.minHz,
    maxHz: s.maxHz,
    retiredOn: s.retiredOn,
    retiredReason: s.retiredReason,
    certificates: s.certificates.map(({ id: _id, ...c }) => c),
    dueOn,
    daysToDue: days,
  };
}

function intervalFor(ctx: ServiceContext, assetId: string): IntervalSuggestion | null {
  try {
    const trend = getTrend(ctx, assetId);
    return {
      months: trend.suggestion.months,
      method: trend.suggestion.methodName,
      reason: trend.suggestion.rationale,
    };
  } catch {
    // Too little history for a suggestion: the certificate then carries none.
    return null;
  }
}

interface Prepared {
  data: CheckDocumentData;
  meta: RevisionMeta;
  signatureIds: number[];
  replaces: IssuedDocumentRecord | undefined;
}

function prepare(ctx: ServiceContext, kind: DocumentKind, input: z.output<typeof IssueSchema>): Prepared {
  const { db } = ctx;
  const lab = requireLab(ctx);
  const revisions = revisionsOf(db, input.checkId);
  if (revisions.length === 0)
    throw LabError.field(
      'checkId',
      input.checkId,
      'the number of a check in this lab',
      `checkId: no check ${input.checkId} in this lab`,
    );
  const signed = revisions.filter((r) => r.state !== 'draft');
  const meta = signed[signed.length - 1];
  if (!meta)
    throw new LabError(
      'refused',
      `check ${input.checkId} has no signed revision: sign it first ("dipledger sign ${input.checkId} --as NAME")`,
      [
        {
          field: 'checkId',
          value: input.checkId,
          expected: 'a signed check',
          message: `checkId: check ${input.checkId} is a draft`,
        },
      ],
    );
  const check = getCheck(db, meta.checkId, meta.revision);
  if (!check)
    throw new LabError('internal', `check ${meta.checkId} revision ${meta.revision} cannot be read`);
  const meter = requireMeter(ctx, check.meterAssetId).meter;
  const records = listStandards(db);
  const used: StandardUsed[] = standardsUsed(db, meta.id, meta.date).map((u) => {
    const s = records.find((r) => r.assetId === u.assetId);
    const cert = s?.certificates.find((c) => c.certificateId === u.certificateId);
    return {
      assetId: u.assetId,
      description: s?.description ?? '',
      certificate:
        cert && u.validOnCheckDate
          ? {
              certificateId: cert.certificateId,
              issuedBy: cert.issuedBy,
              calibratedOn: cert.calibratedOn,
              dueOn: cert.dueOn,
              expandedUncertaintyPpm: cert.expandedUncertaintyPpm,
              coverageFactor: cert.coverageFactor,
            }
          : null,
    };
  });

  const stored = signaturesOf(db, meta.id);
  const signatures: DocumentSignature[] = stored.map((s) => {
    const key = keyById(db, s.keyId);
    if (!key)
      throw new LabError('internal', `the key of signature ${s.seq} on check ${meta.checkId} is missing`);
    return {
      seq: s.seq,
      meaning: s.meaning,
      signer: s.printedName,
      role: s.role,
      signedAt: s.signedAt,
      keyFingerprint: key.sealed.fingerprint,
      publicKeyPem: key.sealed.publicKeyPem,
      payloadSha256: s.payloadSha256,
      signatureB64: s.signatureB64,
    };
  });
  const signedContent = revisionSignedContent(ctx.db, meta);
  // The document must carry what the signatures really cover, or its verification would fail
  // for every reader: refuse to issue rather than print a record nobody can check.
  for (const s of signatures) {
    const digest = sha256Hex(signaturePayload(signedContent, s, signaturesBefore(signatures, s)));
    if (digest !== s.payloadSha256)
      throw new LabError(
        'internal',
        `the signed bytes of signature ${s.seq} (${s.meaning}, ${s.signer}) on check ${meta.checkId} revision ${meta.revision} cannot be rebuilt; nothing was issued`,
      );
  }

  const current = currentDocumentOfCheck(db, kind, input.checkId);
  const noun = kind === 'certificate' ? 'certificate' : 'check-sheet';
  if (current && !input.replaceReason)
    throw new LabError(
      'conflict',
      `check ${input.checkId} already has ${noun} ${current.number} revision ${current.revision} (issued ${current.issuedAt}); to issue a replacement, give the reason for it`,
      [
        {
          field: 'replaceReason',
          value: undefined,
          expected: `why ${current.number} revision ${current.revision} is replaced`,
          message: `replaceReason: missing; ${noun} ${current.number} revision ${current.revision} exists, and a replacement says why (ISO/IEC 17025:2017 7.8.8)`,
        },
      ],
    );
  if (!current && input.replaceReason)
    throw LabError.field(
      'replaceReason',
      input.replaceReason,
      'no reason: nothing is replaced',
      `replaceReason: check ${input.checkId} has no ${noun} yet, so there is nothing to replace`,
    );
  const issuedAt = ctx.clock.now();
  const number = current ? current.number : nextDocumentNumber(db, kind, issuedAt.slice(0, 4));
  const revision = current ? current.revision + 1 : 1;
  const interval =
    kind === 'certificate' && lab.printSuggestedInterval ? intervalFor(ctx, meter.assetId) : null;
  return {
    data: {
      lab,
      meter,
      check,
      standards: used,
      signatures,
      signedContent,
      issue: {
        kind,
        number,
        revision,
        issuedAt,
        issuedBy: ctx.actor,
        auditHead: auditHeadOf(db),
        replaces: current
          ? {
              number: current.number,
              revision: current.revision,
              issuedAt: current.issuedAt,
              reason: input.replaceReason ?? '',
            }
          : null,
      },
      suggestedInterval: interval,
    },
    meta,
    signatureIds: stored.map((s) => s.id),
    replaces: current,
  };
}

function write(
  ctx: ServiceContext,
  p: Prepared,
  r: RenderedDocument,
  signer: DocumentSigner,
): IssuedDocumentFile {
  const { db } = ctx;
  const issue = p.data.issue;
  const id = db.transaction(() => {
    if (findIssuedDocument(db, issue.number, issue.revision))
      throw new LabError(
        'conflict',
        `${issue.number} revision ${issue.revision} was issued meanwhile; issue again`,
      );
    const newId = insertIssuedDocument(db, {
      kind: issue.kind,
      number: issue.number,
      revision: issue.revision,
      checkRevisionId: p.meta.id,
      issuedAt: issue.issuedAt,
      issuedBy: issue.issuedBy,
      replacesId: p.replaces?.id ?? null,
      replaceReason: p.replaces ? (issue.replaces?.reason ?? null) : null,
      sha256: r.sha256,
      recordSha256: r.recordSha256,
      recordName: r.recordName,
      pades: true,
      intervalPrinted: p.data.suggestedInterval !== null,
      pdf: r.pdf,
      signatureIds: p.signatureIds,
    });
    appendAudit(db, {
      at: issue.issuedAt,
      actor: ctx.actor,
      action: p.replaces ? 'replace' : 'issue',
      entity: 'document',
      entityId: `${issue.number} revision ${issue.revision}`,
      before: p.replaces
        ? { number: p.replaces.number, revision: p.replaces.revision, sha256: p.replaces.sha256 }
        : undefined,
      after: {
        kind: issue.kind,
        check: p.meta.checkId,
        checkRevision: p.meta.revision,
        sha256: r.sha256,
        recordSha256: r.recordSha256,
        reason: issue.replaces?.reason ?? null,
      },
    });
    keepSigningCertificate(ctx, signer, issue.issuedAt);
    return newId;
  })();
  const row = issuedDocumentById(db, id);
  if (!row) throw new LabError('internal', `issued document ${id} cannot be read back`);
  return { ...toIssued(ctx, row), pdfBase64: r.pdf.toString('base64') };
}

function issue(ctx: ServiceContext, kind: DocumentKind, raw: unknown): IssuedDocumentFile {
  const input = parseWith(IssueSchema, raw);
  const p = prepare(ctx, kind, input);
  const render = kind === 'certificate' ? renderCertificate : renderCheckSheet;
  const own = input.pdfSignature
    ? pkcs12DocumentSigner(input.pdfSignature.p12Base64, input.pdfSignature.passphrase)
    : undefined;
  const pending = (async () => {
    const signer = own ?? (await labDocumentSigner(ctx));
    return write(ctx, p, await signRendered(render(p.data), signer), signer);
  })();
  // See the note at the top of the file: the async wrapper adopts this promise.
  return pending as unknown as IssuedDocumentFile;
}

function labEvidence(ctx: ServiceContext): LabEvidence {
  const { db } = ctx;
  const evidence = (d: IssuedDocumentRecord | undefined): IssuedEvidence | undefined => {
    if (!d) return undefined;
    const by = d.replacedById === null ? undefined : issuedDocumentById(db, d.replacedById);
    return {
      number: d.number,
      revision: d.revision,
      sha256: d.sha256,
      recordSha256: d.recordSha256,
      checkId: d.checkId,
      checkRevision: d.checkRevision,
      issuedAt: d.issuedAt,
      replacedBy: by ? { number: by.number, revision: by.revision } : null,
      signatureB64s: documentSignatureB64s(db, d.id),
    };
  };
  const people = listPeople(db);
  const keys = allKeys(db);
  return {
    labName: requireLab(ctx).name,
    documentCertificates: documentKeyFingerprints(db),
    issued: (number, revision) => evidence(findIssuedDocument(db, number, revision)),
    issuedWithSha256: (sha) => evidence(findIssuedDocumentBySha256(db, sha)),
    keysOf(name) {
      const person = people.find((p) => p.name.toLowerCase() === name.toLowerCase());
      if (!person) return undefined;
      return keys
        .filter((k) => k.personId === person.id)
        .map((k) => ({ fingerprint: k.sealed.fingerprint, publicKeyPem: k.sealed.publicKeyPem }));
    },
    ownerOfKey(fingerprint) {
      const k = keys.find((x) => x.sealed.fingerprint === fingerprint);
      return k && people.find((p) => p.id === k.personId)?.name;
    },
  };
}

export function issueCertificate(
  ctx: ServiceContext,
  input: Parameters<DocumentsApi['issueCertificate']>[0],
) {
  return issue(ctx, 'certificate', input);
}

export function issueSheet(ctx: ServiceContext, input: Parameters<DocumentsApi['issueSheet']>[0]) {
  return issue(ctx, 'check-sheet', input);
}

export function worksheet(ctx: ServiceContext, assetId: Parameters<DocumentsApi['worksheet']>[0]) {
  if (typeof assetId !== 'string' || assetId.trim() === '')
    throw LabError.field('assetId', assetId, 'the asset id of a meter, such as "WG-202"');
  const rec = requireMeter(ctx, assetId);
  if (rec.meter.state === 'withdrawn')
    throw LabError.field(
      'assetId',
      assetId,
      'a meter that is not withdrawn',
      `assetId: ${describe(assetId)} is withdrawn; nothing to check`,
    );
  const printedOn = ctx.clock.today();
  const pdf = renderWorksheet({
    lab: requireLab(ctx),
    meter: rec.meter,
    standards: listStandards(ctx.db).map((s) => toStandard(ctx, s)),
    printedOn,
  });
  return { assetId: rec.meter.assetId, printedOn, pdfBase64: pdf.toString('base64') };
}

export function listDocuments(ctx: ServiceContext, query: Parameters<DocumentsApi['listDocuments']>[0]) {
  const q = parseWith(QuerySchema, query);
  return listIssuedDocuments(ctx.db, { meterAssetId: q?.meter, checkId: q?.checkId }).map((d) =>
    toIssued(ctx, d),
  );
}

export function verifyDocument(ctx: ServiceContext, input: Parameters<DocumentsApi['verifyDocument']>[0]) {
  const v = parseWith(VerifySchema, input);
  const bytes = Buffer.from(v.pdfBase64, 'base64');
  return verifyDocumentBytes(bytes, labEvidence(ctx));
}

/** The certificate the lab signs documents with, made (and audited) if the lab has none. */
export function documentCertificate(ctx: ServiceContext) {
  const pending = ensureLabDocumentKey(ctx).then((k) => {
    const c = new X509Certificate(k.certificatePem);
    return {
      fingerprint: k.fingerprint,
      subject: c.subject.replace(/\n/g, ', '),
      validFrom: new Date(c.validFrom).toISOString(),
      validTo: new Date(c.validTo).toISOString(),
      certificatePem: k.certificatePem,
    };
  });
  // See the note at the top of the file: the async wrapper adopts this promise.
  return pending as unknown as DocumentCertificate;
}

export const documentOps = {
  issueCertificate,
  issueSheet,
  worksheet,
  listDocuments,
  verifyDocument,
  documentCertificate,
} satisfies OpGroup<keyof DocumentsApi>;
