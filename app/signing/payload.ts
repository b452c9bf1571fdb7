// What a signature covers, built in one place: the signed content of a check revision
// ("dipledger.check-record/1") and the payload a person signs over it ("dipledger.signature/1"),
// canonical per RFC 8785. Recording, issuing and verifying all call these, so what is signed and
// what is checked cannot drift apart when a record gains a field.
//
// The content is built field by field under its named format: a field added to CheckRecord
// later does not change what old signatures cover. The revision's state is left out: a signed
// revision later marked "amended" must still verify.
import type { CheckRecord } from '../model/records';
import type { SignatureMeaning } from '../model/revisions';
import { canonicalBytes } from './keys';

export const SIGNED_CONTENT_FORMAT = 'dipledger.check-record/1';
export const SIGNATURE_FORMAT = 'dipledger.signature/1';

/** What the revision adds to its record: why and by whom it was amended, and the standards
 * used outside their calibration under a permissive policy. */
export interface RevisionFacts {
  amendReason: string | null;
  amendedBy: string | null;
  exceptions: string[];
}

/** A standard used by the check, with the certificate that covered it (extra fields ignored). */
export interface CertifiedStandard {
  assetId: string;
  certificateId: string;
  issuedBy: string;
  calibratedOn: string;
  dueOn: string;
}

/** Everything about one revision that its signatures cover. */
export function signedContent(
  r: CheckRecord,
  revision: RevisionFacts,
  standardsUsed: readonly CertifiedStandard[],
): unknown {
  return {
    format: SIGNED_CONTENT_FORMAT,
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
    amendment:
      revision.amendReason === null ? null : { reason: revision.amendReason, by: revision.amendedBy },
    standardsUsed: standardsUsed.map((s) => ({
      assetId: s.assetId,
      certificateId: s.certificateId,
      issuedBy: s.issuedBy,
      calibratedOn: s.calibratedOn,
      dueOn: s.dueOn,
    })),
    traceabilityExceptions: revision.exceptions,
  };
}

/** The manifestation shown with a signature (21 CFR 11.50): who, in what role, with which key,
 * meaning what, when. */
export interface SignatureManifest {
  printedName: string;
  role: string;
  keyFingerprint: string;
  meaning: SignatureMeaning;
  signedAt: string;
}

/** A signature made before on the same revision. */
export interface PriorSignature {
  seq: number;
  meaning: SignatureMeaning;
  signatureB64: string;
}

/** The bytes a signature covers: the whole revision's signed content, the manifestation shown
 * with the signature, and the signatures before it on the same revision (so a review covers the
 * performer's signature too). Canonical per RFC 8785, so they can be rebuilt years later. */
export function signaturePayload(
  content: unknown,
  s: SignatureManifest,
  before: readonly PriorSignature[],
): Buffer {
  return canonicalBytes({
    format: SIGNATURE_FORMAT,
    content,
    signer: { printedName: s.printedName, role: s.role, keyFingerprint: s.keyFingerprint },
    meaning: s.meaning,
    signedAt: s.signedAt,
    previous: before.map((p) => ({ seq: p.seq, meaning: p.meaning, signature: p.signatureB64 })),
  });
}
