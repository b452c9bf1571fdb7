// Rebuilding the bytes a person's signature covers, from what a document carries: the signed
// content of the revision, the signature's own fields (name, role, key, meaning, time) and the
// signatures made before it on the same revision, through the one payload builder
// (app/signing/payload.ts) that signing uses too.
import { canonicalBytes, fingerprintOf, sha256Hex, verifyBytes } from '../signing/keys';
import { signaturePayload as payloadOf } from '../signing/payload';
import type { DocumentSignature } from './model';

export function signaturePayload(
  content: unknown,
  s: DocumentSignature,
  before: DocumentSignature[],
): Buffer {
  return payloadOf(
    content,
    {
      printedName: s.signer,
      role: s.role,
      keyFingerprint: s.keyFingerprint,
      meaning: s.meaning,
      signedAt: s.signedAt,
    },
    before,
  );
}

/** The signatures made before `s` on its revision. */
export function signaturesBefore(all: DocumentSignature[], s: DocumentSignature): DocumentSignature[] {
  return all.filter((x) => x.seq < s.seq).sort((a, b) => a.seq - b.seq);
}

export { canonicalBytes, fingerprintOf, sha256Hex as sha256OfBytes, verifyBytes };
