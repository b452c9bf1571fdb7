// Checks an issued document on its own and, where the lab file is at hand, against what the lab
// recorded when it issued it. Says plainly what holds and what does not; any "fail" is a
// mismatch. What it checks:
// - the file is a Dipledger document and carries its machine-readable record;
// - the record is the one the document was issued with (digest in the file, and in the lab);
// - the file is byte for byte the one issued (SHA-256 recorded by the lab);
// - the record agrees with itself (exchange fields against the recorded check, signed content);
// - every signature: the bytes it covers rebuild to its digest, the key is the signer's (the
//   lab's key register; without a lab, only the key the record names), and Ed25519 verifies;
// - the PDF signature (pdf-signature.ts): one, valid, covering the whole file, and with the lab
//   file, made with one of the lab's document-signing certificates;
// - the pages show the record: drawn again from it, the file is the same (verify-render.ts).
import type { CheckRecord } from '../model/records';
import { INFO_KEYS } from './certificate';
import { checkEmbeddedDcc } from './dcc-verify';
import { checkPdfSignature } from './pdf-signature';
import { readPdf, PdfReadError, type PdfContents } from './pdfread';
import { decodeRecord, sha256Hex, type EmbeddedRecord } from './record';
import { compareWithRedraw } from './verify-render';
import { canonicalBytes, fingerprintOf, signaturePayload, signaturesBefore, verifyBytes } from './signatures';

export type FindingStatus = 'ok' | 'fail' | 'not-checked';

export interface VerifyFinding {
  check: string;
  status: FindingStatus;
  detail: string;
}

export interface VerifyReport {
  ok: boolean;
  sha256: string;
  document: { number: string; revision: number; kind: string } | null;
  check: { checkId: number; revision: number; meter: string; date: string } | null;
  findings: VerifyFinding[];
}

/** What the lab file recorded about a document, looked up by the caller. */
export interface IssuedEvidence {
  number: string;
  revision: number;
  sha256: string;
  recordSha256: string;
  checkId: number;
  checkRevision: number;
  issuedAt: string;
  replacedBy: { number: string; revision: number } | null;
  /** Signatures the lab shows on it (by their base64 value). */
  signatureB64s: string[];
}

export interface LabEvidence {
  labName: string;
  /** The issue record of a document by number and revision, if the lab issued it. */
  issued(number: string, revision: number): IssuedEvidence | undefined;
  /** Which issued document has exactly these bytes, if any. */
  issuedWithSha256(sha256: string): IssuedEvidence | undefined;
  /** Public keys registered to a person, by name; undefined when the lab has no such person. */
  keysOf(name: string): { fingerprint: string; publicKeyPem: string }[] | undefined;
  /** Who a key belongs to, by fingerprint. */
  ownerOfKey(fingerprint: string): string | undefined;
  /** SHA-256 fingerprints of the certificates the lab signs documents with (its own and any
   * PKCS#12 it signed with). */
  documentCertificates?: string[];
}

function isRecord(x: unknown): x is EmbeddedRecord {
  if (typeof x !== 'object' || x === null) return false;
  const r = x as Partial<EmbeddedRecord>;
  return (
    r.format === 'dipledger.check/1' &&
    typeof r.record === 'object' &&
    r.record !== null &&
    Array.isArray(r.signatures) &&
    typeof r.document === 'object' &&
    r.document !== null
  );
}

export function verifyDocumentBytes(pdf: Buffer, lab?: LabEvidence): VerifyReport {
  const findings: VerifyFinding[] = [];
  const ok = (check: string, detail: string) => findings.push({ check, status: 'ok', detail });
  const fail = (check: string, detail: string) => findings.push({ check, status: 'fail', detail });
  const skip = (check: string, detail: string) => findings.push({ check, status: 'not-checked', detail });
  const sha256 = sha256Hex(pdf);
  const report = (document: VerifyReport['document'], check: VerifyReport['check']): VerifyReport => ({
    ok: findings.every((f) => f.status !== 'fail'),
    sha256,
    document,
    check,
    findings,
  });

  let contents: PdfContents;
  try {
    contents = readPdf(pdf);
  } catch (e) {
    fail(
      'structure',
      e instanceof PdfReadError ? `the file cannot be read: ${e.message}` : 'the file cannot be read',
    );
    if (lab) {
      const issued = lab.issuedWithSha256(sha256);
      if (!issued) fail('lab copy', `no document issued by ${lab.labName} has these bytes`);
    }
    return report(null, null);
  }

  const number = contents.info[INFO_KEYS.number];
  const revision = Number(contents.info[INFO_KEYS.revision]);
  const kind = contents.info[INFO_KEYS.kind] ?? 'document';
  if (!number || !Number.isInteger(revision)) {
    fail('identity', 'the file names no Dipledger document number: it is not a document issued by Dipledger');
    return report(null, null);
  }
  const document = { number, revision, kind };
  ok('identity', `${kind} ${number} revision ${revision}`);
  const pdfSignature = checkPdfSignature(pdf);
  pdfSignatureFindings(pdfSignature, lab, ok, fail, skip);

  // The file against the lab's issue record.
  const issued = lab?.issued(number, revision);
  if (lab) {
    if (!issued) {
      fail('issued by the lab', `${lab.labName} has no record of issuing ${number} revision ${revision}`);
    } else if (issued.sha256 === sha256) {
      ok(
        'file unchanged',
        `the SHA-256 of the file matches the one recorded when it was issued (${issued.issuedAt}): ${sha256}`,
      );
    } else {
      fail(
        'file unchanged',
        `the file has been changed since it was issued: its SHA-256 is ${sha256}, the lab recorded ${issued.sha256} when it issued ${number} revision ${revision}`,
      );
    }
    if (issued?.replacedBy)
      fail(
        'current',
        `${number} revision ${revision} has been replaced by ${issued.replacedBy.number} revision ${issued.replacedBy.revision} (ISO/IEC 17025:2017 7.8.8): do not rely on it`,
      );
  } else {
    skip(
      'file unchanged',
      'no lab file given: the SHA-256 of the file cannot be compared with the issue record',
    );
  }

  // The embedded record.
  const recordName = contents.info[INFO_KEYS.recordName];
  const attached =
    contents.files.find((f) => f.name === recordName) ?? contents.files.find((f) => f.name.endsWith('.json'));
  if (!attached) {
    fail('embedded record', 'the file carries no machine-readable record');
    return report(document, null);
  }
  if (attached.damaged) {
    fail(
      'embedded record',
      `the attached record ${attached.name} is damaged: its compressed data does not decode`,
    );
    return report(document, null);
  }
  const recordSha256 = sha256Hex(attached.bytes);
  const statedSha256 = contents.info[INFO_KEYS.recordSha256];
  if (statedSha256 === recordSha256)
    ok('embedded record', `${attached.name} matches the digest the document states (${recordSha256})`);
  else
    fail(
      'embedded record',
      `the attached record ${attached.name} is not the one this document was issued with: its SHA-256 is ${recordSha256}, the document states ${statedSha256 ?? 'none'}`,
    );
  if (issued && issued.recordSha256 !== recordSha256)
    fail(
      'embedded record in the lab',
      `the attached record differs from the one the lab recorded for ${number} revision ${revision} (lab ${issued.recordSha256}, file ${recordSha256})`,
    );

  let parsed: unknown;
  try {
    parsed = decodeRecord(attached.bytes);
  } catch {
    fail('embedded record', `${attached.name} is not valid JSON`);
    return report(document, null);
  }
  if (!isRecord(parsed)) {
    fail('embedded record', `${attached.name} is not a Dipledger check record`);
    return report(document, null);
  }
  const rec = parsed.record;
  const checkInfo = { checkId: rec.checkId, revision: rec.revision, meter: rec.meterAssetId, date: rec.date };

  if (parsed.document.number !== number || parsed.document.revision !== revision)
    fail(
      'record belongs to this document',
      `the attached record was made for ${parsed.document.number} revision ${parsed.document.revision}, not ${number} revision ${revision}`,
    );
  else ok('record belongs to this document', `the record names ${number} revision ${revision}`);
  if (issued) {
    if (issued.checkId !== rec.checkId || issued.checkRevision !== rec.revision)
      fail(
        'record is the issued check',
        `the attached record is check ${rec.checkId} revision ${rec.revision} (${rec.meterAssetId}, ${rec.date}), but ${number} revision ${revision} was issued for check ${issued.checkId} revision ${issued.checkRevision}`,
      );
    else
      ok(
        'record is the issued check',
        `check ${rec.checkId} revision ${rec.revision} of ${rec.meterAssetId}`,
      );
  }

  consistency(parsed, rec, ok, fail);
  checkEmbeddedDcc(contents, parsed, ok, fail, skip);
  signatures(parsed, lab, issued, ok, fail, skip);

  const redraw = compareWithRedraw(pdf, parsed, pdfSignature.byteRange);
  if (redraw.ok) ok('pages show the record', redraw.detail);
  else fail('pages show the record', redraw.detail);
  return report(document, checkInfo);
}

function pdfSignatureFindings(
  sig: ReturnType<typeof checkPdfSignature>,
  lab: LabEvidence | undefined,
  ok: (c: string, d: string) => void,
  fail: (c: string, d: string) => void,
  skip: (c: string, d: string) => void,
): void {
  const check = 'PDF signature';
  if (!sig.present) {
    fail(
      check,
      'the file carries no PDF signature: it was removed, or the document was issued before documents were signed as PDFs',
    );
    return;
  }
  if (sig.problems.length) {
    fail(check, sig.problems.join('; '));
    return;
  }
  const who = sig.certificate?.subject.replace(/\n/g, ', ') ?? '?';
  ok(
    check,
    `valid (PAdES B-B, CMS with the ESS signing certificate) and covering the whole file but its own value; signed by "${who}", certificate SHA-256 ${sig.fingerprint ?? '?'}`,
  );
  const mine = "PDF signature is the lab's";
  if (lab?.documentCertificates) {
    if (sig.fingerprint && lab.documentCertificates.includes(sig.fingerprint))
      ok(mine, `the signing certificate is one ${lab.labName} signs documents with`);
    else
      fail(mine, `${lab.labName} has never signed documents with the certificate ${sig.fingerprint ?? '?'}`);
  } else
    skip(
      mine,
      `no lab file given: compare the certificate's SHA-256 ${sig.fingerprint ?? '?'} with the one the lab publishes`,
    );
}

function consistency(
  r: EmbeddedRecord,
  rec: CheckRecord,
  ok: (c: string, d: string) => void,
  fail: (c: string, d: string) => void,
): void {
  const problems: string[] = [];
  if (r.meter !== rec.meterAssetId) problems.push(`meter ${r.meter} against ${rec.meterAssetId}`);
  if (r.date !== rec.date) problems.push(`date ${r.date} against ${rec.date}`);
  if (r.points.length !== rec.points.length)
    problems.push(`${r.points.length} points against ${rec.points.length}`);
  r.points.forEach((p, i) => {
    const q = rec.points[i];
    if (q && `${q.referenceHz} Hz` !== p.reference)
      problems.push(`point ${i + 1} reference ${p.reference} against ${q.referenceHz} Hz`);
    if (q && p.readings.length !== q.readings.length)
      problems.push(`point ${i + 1} has a different number of readings`);
  });
  // The recorded check must be exactly what was signed (its state aside: a signed revision
  // later marked amended keeps its signatures).
  const content = r.signedContent as { record?: unknown } | null;
  const { state, ...withoutState } = rec;
  void state;
  if (!content || typeof content !== 'object' || !('record' in content))
    problems.push('the record carries no signed content');
  else if (!canonicalBytes(content.record).equals(canonicalBytes(withoutState)))
    problems.push('the check shown differs from the content the signatures cover');
  if (problems.length) fail('record consistent', problems.join('; '));
  else ok('record consistent', 'the exchange document, the recorded check and the signed content agree');
}

function signatures(
  r: EmbeddedRecord,
  lab: LabEvidence | undefined,
  issued: IssuedEvidence | undefined,
  ok: (c: string, d: string) => void,
  fail: (c: string, d: string) => void,
  skip: (c: string, d: string) => void,
): void {
  if (r.signatures.length === 0) {
    fail('signatures', 'the record carries no signatures');
    return;
  }
  for (const s of r.signatures) {
    const label = `signature "${s.meaning}" by ${s.signer}`;
    const payload = signaturePayload(r.signedContent, s, signaturesBefore(r.signatures, s));
    if (sha256Hex(payload) !== s.payloadSha256) {
      fail(
        label,
        `the content it covers has changed: the rebuilt bytes hash to ${sha256Hex(payload)}, the signature was made over ${s.payloadSha256}`,
      );
      continue;
    }
    let pem: string | undefined;
    if (lab) {
      const keys = lab.keysOf(s.signer);
      const key = keys?.find((k) => k.fingerprint === s.keyFingerprint);
      if (!keys || keys.length === 0) {
        fail(label, `${lab.labName} has no signing key registered to ${s.signer}`);
        continue;
      }
      if (!key) {
        const owner = lab.ownerOfKey(s.keyFingerprint);
        fail(
          label,
          `the signing key is not ${s.signer}'s: key ${s.keyFingerprint.slice(0, 16)}… ${owner ? `belongs to ${owner}` : 'is not registered in the lab'}`,
        );
        // Say also whether the signature holds with the signer's real key (it should not).
        const real = keys.find((k) => verifyBytes(k.publicKeyPem, payload, s.signatureB64));
        if (real)
          fail(
            label,
            'the signature nevertheless verifies with a key of the signer: the record names the wrong key',
          );
        continue;
      }
      pem = key.publicKeyPem;
    } else {
      let fp = '';
      try {
        fp = fingerprintOf(s.publicKeyPem);
      } catch {
        fp = '';
      }
      if (fp !== s.keyFingerprint) {
        fail(label, 'the public key in the record does not have the fingerprint the signature names');
        continue;
      }
      pem = s.publicKeyPem;
    }
    if (!verifyBytes(pem, payload, s.signatureB64)) {
      fail(
        label,
        lab
          ? `does not verify with ${s.signer}'s public key (${s.keyFingerprint.slice(0, 16)}…): the signing key is not the signer's or the signature was altered`
          : 'does not verify with the public key the record names',
      );
      continue;
    }
    if (issued && !issued.signatureB64s.includes(s.signatureB64)) {
      fail(label, 'verifies, but is not one of the signatures the lab shows on this document');
      continue;
    }
    if (lab)
      ok(
        label,
        `verifies with ${s.signer}'s registered key (${s.keyFingerprint.slice(0, 16)}…), signed ${s.signedAt}`,
      );
    else {
      ok(
        label,
        `verifies with the key the record names (${s.keyFingerprint.slice(0, 16)}…), signed ${s.signedAt}`,
      );
      skip(
        `${label}: whose key`,
        "no lab file given: that the key is the signer's is taken from the document itself",
      );
    }
  }
}
