// The one builder of what a signature covers (app/signing/payload.ts) gives, on the demo lab's
// signed checks, the very bytes each of the three earlier builders gave: the payload the records
// operations signed field by field (its SHA-256 is stored with every signature), the content
// the documents operations built by spreading the record, and the payload the documents rebuilt
// for verification. RFC 8785 (JSON Canonicalization Scheme) makes the bytes comparable.
import { rmSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { canonicalBytes, sha256Hex } from '../../app/signing/keys';
import { signaturePayload, signedContent } from '../../app/signing/payload';
import type { DocumentSignature } from '../../app/documents/model';
import { signaturePayload as documentPayload } from '../../app/documents/signatures';
import { getCheck } from '../../db/queries/checks';
import { lockedRevisions, signaturesOf, standardsUsed, type RevisionMeta } from '../../db/queries/records';
import { revisionSignedContent } from '../../db/queries/signed-content';
import { openLabDb, type LabDb } from '../../db/store';
import { demoLab, type DemoLab } from '../documents/fixture';

let demo: DemoLab;
let db: LabDb;
beforeAll(async () => {
  demo = await demoLab();
  db = openLabDb(demo.file);
}, 180_000);
afterAll(() => {
  db.close();
  demo.lab.close();
  rmSync(demo.dir, { recursive: true, force: true });
});

/** The content as the documents operations built it before: the record spread, state left out. */
function spreadContent(meta: RevisionMeta): unknown {
  const rec = getCheck(db, meta.checkId, meta.revision);
  if (!rec) throw new Error('no record');
  const { state, ...record } = rec;
  void state;
  return {
    format: 'dipledger.check-record/1',
    record,
    amendment: meta.amendReason === null ? null : { reason: meta.amendReason, by: meta.amendedBy },
    standardsUsed: standardsUsed(db, meta.id, meta.date).map(({ validOnCheckDate: _v, ...s }) => s),
    traceabilityExceptions: meta.exceptions,
  };
}

/** The payload as the documents rebuilt it before, kept here as the reference. */
function earlierDocumentPayload(content: unknown, s: DocumentSignature, before: DocumentSignature[]): Buffer {
  return canonicalBytes({
    format: 'dipledger.signature/1',
    content,
    signer: { printedName: s.signer, role: s.role, keyFingerprint: s.keyFingerprint },
    meaning: s.meaning,
    signedAt: s.signedAt,
    previous: before.map((p) => ({ seq: p.seq, meaning: p.meaning, signature: p.signatureB64 })),
  });
}

describe('the one signature builder on the demo lab', () => {
  it('rebuilds the payload every stored signature was made over (SHA-256 as stored)', () => {
    const locked = lockedRevisions(db);
    let checked = 0;
    for (const meta of locked) {
      const content = revisionSignedContent(db, meta);
      const sigs = signaturesOf(db, meta.id);
      for (const s of sigs) {
        const before = sigs.filter((p) => p.seq < s.seq);
        const bytes = signaturePayload(content, s, before);
        expect(sha256Hex(bytes)).toBe(s.payloadSha256);
        checked++;
      }
    }
    // Two checks, each performed and reviewed.
    expect(checked).toBe(4);
  });

  it('gives the same canonical content as the record spread the documents operations used', () => {
    const locked = lockedRevisions(db);
    expect(locked.length).toBeGreaterThanOrEqual(2);
    for (const meta of locked) {
      const built = canonicalBytes(revisionSignedContent(db, meta));
      expect(built.equals(canonicalBytes(spreadContent(meta)))).toBe(true);
      const rec = getCheck(db, meta.checkId, meta.revision);
      if (!rec) throw new Error('no record');
      expect(
        canonicalBytes(signedContent(rec, meta, standardsUsed(db, meta.id, meta.date))).equals(built),
      ).toBe(true);
    }
  });

  it('gives the documents the same payload bytes as their earlier builder', () => {
    for (const meta of lockedRevisions(db)) {
      const content = revisionSignedContent(db, meta);
      const sigs: DocumentSignature[] = signaturesOf(db, meta.id).map((s) => ({
        seq: s.seq,
        meaning: s.meaning,
        signer: s.printedName,
        role: s.role,
        signedAt: s.signedAt,
        keyFingerprint: s.keyFingerprint,
        publicKeyPem: '',
        payloadSha256: s.payloadSha256,
        signatureB64: s.signatureB64,
      }));
      for (const s of sigs) {
        const before = sigs.filter((p) => p.seq < s.seq);
        expect(documentPayload(content, s, before).equals(earlierDocumentPayload(content, s, before))).toBe(
          true,
        );
      }
    }
  });
});
