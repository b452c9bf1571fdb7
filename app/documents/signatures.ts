// Rebuilding the bytes a person's signature covers, from what a document carries: the signed
// content of the revision, the signature's own fields (name, role, key, meaning, time) and the
// signatures made before it on the same revision. The layout is the "dipledger.signature/1"
// payload the records operations sign (app/api/ops-records.ts), canonical per RFC 8785; issuing
// refuses a document whose rebuilt bytes do not hash to the stored payload digest, so the two
// can never drift apart unnoticed.
import { canonicalBytes, fingerprintOf, sha256Hex, verifyBytes } from '../api/records-signing';
import type { DocumentSignature } from './model';

export function signaturePayload(
  content: unknown,
  s: DocumentSignature,
  before: DocumentSignature[],
): Buffer {
  return canonicalBytes({
    format: 'dipledger.signature/1',
    content,
    signer: { printedName: s.signer, role: s.role, keyFingerprint: s.keyFingerprint },
    meaning: s.meaning,
    signedAt: s.signedAt,
    previous: before.map((p) => ({ seq: p.seq, meaning: p.meaning, signature: p.signatureB64 })),
  });
}

/** The signatures made before `s` on its revision. */
export function signaturesBefore(all: DocumentSignature[], s: DocumentSignature): DocumentSignature[] {
  return all.filter((x) => x.seq < s.seq).sort((a, b) => a.seq - b.seq);
}

export { canonicalBytes, fingerprintOf, sha256Hex as sha256OfBytes, verifyBytes };
