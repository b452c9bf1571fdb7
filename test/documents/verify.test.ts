// `verify` on issued documents: it passes on the file as issued, and fails naming the reason
// when a byte of the PDF is changed, when the embedded record is swapped for another check's,
// and when a signature was made with a key that is not the signer's. Also the optional embedded
// PDF signature made with a throwaway PKCS#12, which pdfsig must report valid.
import { generateKeyPairSync, sign } from 'node:crypto';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { IssuedDocumentFile } from '../../app/api/contract-documents';
import { renderCertificate } from '../../app/documents/certificate';
import { standardsUsed, type DocumentSignature } from '../../app/documents/model';
import { readPdf } from '../../app/documents/pdfread';
import { decodeRecord, sha256Hex, type EmbeddedRecord } from '../../app/documents/record';
import { fingerprintOf, signaturePayload, signaturesBefore } from '../../app/documents/signatures';
import { verifyDocumentBytes } from '../../app/documents/verify';
import { runCli, type CliIo } from '../../app/cli/main';
import { clock } from '../fixtures/lab';
import { ALBA, demoLab, HAS_POPPLER, run, writeTemp, type DemoLab } from './fixture';
import { throwawayP12 } from './p12';

let demo: DemoLab;
let cert: IssuedDocumentFile;
let other: IssuedDocumentFile;
let pdf: Buffer;

beforeAll(async () => {
  demo = await demoLab();
  cert = await demo.lab.api.issueCertificate({ checkId: demo.adjustedCheckId });
  other = await demo.lab.api.issueCertificate({ checkId: demo.newestCheckId });
  pdf = Buffer.from(cert.pdfBase64, 'base64');
});
afterAll(() => demo.lab.close());

const verify = (bytes: Buffer) => demo.lab.api.verifyDocument({ pdfBase64: bytes.toString('base64') });
const failures = (r: { findings: { status: string; check: string; detail: string }[] }) =>
  r.findings.filter((f) => f.status === 'fail').map((f) => `${f.check}: ${f.detail}`);

function recordOf(bytes: Buffer): EmbeddedRecord {
  const f = readPdf(bytes).files[0];
  if (!f) throw new Error('no record attached');
  return decodeRecord(f.bytes) as EmbeddedRecord;
}

/** Replaces the attached record's stream object in `target` with the one from `source`. */
function swapRecord(target: Buffer, source: Buffer): Buffer {
  const streamObject = (b: Buffer) => {
    const t = b.toString('latin1');
    const at = t.indexOf('/Type /EmbeddedFile');
    const start = t.lastIndexOf(' 0 obj', at);
    const objStart = t.lastIndexOf('\n', start) + 1;
    const end = t.indexOf('endobj', at) + 'endobj'.length;
    return { objStart, end, body: t.slice(t.indexOf(' 0 obj', objStart), end) };
  };
  const a = streamObject(target);
  const b = streamObject(source);
  const idA = target
    .toString('latin1')
    .slice(a.objStart, target.toString('latin1').indexOf(' 0 obj', a.objStart));
  return Buffer.concat([
    target.subarray(0, a.objStart),
    Buffer.from(`${idA}${b.body}`, 'latin1'),
    target.subarray(a.end),
  ]);
}

function io(cwd: string): CliIo & { stdout: string[]; stderr: string[] } {
  const stdout: string[] = [];
  const stderr: string[] = [];
  return { stdout, stderr, out: (t) => stdout.push(t), err: (t) => stderr.push(t), env: {}, cwd, clock };
}

describe('verify', () => {
  it('passes on a document as issued: file, record and both signatures', async () => {
    const r = await verify(pdf);
    expect(failures(r)).toEqual([]);
    expect(r.ok).toBe(true);
    expect(r.document).toEqual({ number: cert.number, revision: 1, kind: 'certificate' });
    expect(r.check?.checkId).toBe(demo.adjustedCheckId);
    const ok = r.findings.filter((f) => f.status === 'ok').map((f) => f.check);
    expect(ok).toEqual(
      expect.arrayContaining([
        'file unchanged',
        'embedded record',
        'record is the issued check',
        'record consistent',
        'signature "performed" by Ravi Ostrander',
        'signature "reviewed" by Maren Holt-Ibsen',
      ]),
    );
  });

  it('without the lab file checks the document alone and says what it could not check', () => {
    const r = verifyDocumentBytes(pdf);
    expect(r.ok).toBe(true);
    expect(r.findings.find((f) => f.check === 'file unchanged')?.status).toBe('not-checked');
    expect(r.findings.filter((f) => f.status === 'ok').length).toBeGreaterThanOrEqual(4);
  });

  it('fails naming the reason when one byte of the PDF is changed', async () => {
    // A byte inside the first page's content stream, not in the record.
    const t = pdf.toString('latin1');
    const contents = /\/Contents (\d+) 0 R/.exec(t)?.[1];
    const obj = t.indexOf(`\n${contents} 0 obj`);
    const at = t.indexOf('stream\n', obj) + 'stream\n'.length + 40;
    const changed = Buffer.from(pdf);
    changed[at] = (changed[at] as number) ^ 0x01;
    const r = await verify(changed);
    expect(r.ok).toBe(false);
    expect(failures(r).join('\n')).toMatch(
      /file unchanged: the file has been changed since it was issued: its SHA-256 is [0-9a-f]{64}, the lab recorded/,
    );
  });

  it("fails naming the reason when the embedded record is swapped for another check's", async () => {
    const swapped = swapRecord(pdf, Buffer.from(other.pdfBase64, 'base64'));
    expect(recordOf(swapped).record.checkId).toBe(demo.newestCheckId);
    const r = await verify(swapped);
    expect(r.ok).toBe(false);
    const text = failures(r).join('\n');
    expect(text).toMatch(
      /embedded record: the attached record .* is not the one this document was issued with/,
    );
    expect(text).toMatch(
      new RegExp(
        `record is the issued check: the attached record is check ${demo.newestCheckId} revision 1 .* but ${cert.number} revision 1 was issued for check ${demo.adjustedCheckId} revision 1`,
      ),
    );
    expect(text).toMatch(
      /record belongs to this document: the attached record was made for C-2026-\d{4} revision 1, not/,
    );
    // Without the lab the swap is still caught by the digest the document states.
    expect(failures(verifyDocumentBytes(swapped)).join('\n')).toMatch(
      /is not the one this document was issued with/,
    );
  });

  it("fails naming the reason when the signing key is not the signer's", async () => {
    const rec = recordOf(pdf);
    const meter = (await demo.lab.api.getMeter('WG-201')).meter;
    const standards = standardsUsed(rec.record, await demo.lab.api.listStandards());
    const reviewed = rec.signatures.find((s) => s.meaning === 'reviewed') as DocumentSignature;

    // Case 1: signed with a key that is not in the lab, claiming to be the reviewer's.
    const { publicKey, privateKey } = generateKeyPairSync('ed25519');
    const pem = publicKey.export({ type: 'spki', format: 'pem' }).toString();
    const forged: DocumentSignature = { ...reviewed, publicKeyPem: pem, keyFingerprint: fingerprintOf(pem) };
    const payload = signaturePayload(rec.signedContent, forged, signaturesBefore(rec.signatures, forged));
    forged.payloadSha256 = sha256Hex(payload);
    forged.signatureB64 = sign(null, payload, privateKey).toString('base64');
    const data = {
      lab: await demo.lab.api.getLab(),
      meter,
      check: rec.record,
      standards,
      signatures: rec.signatures.map((s) => (s.meaning === 'reviewed' ? forged : s)),
      signedContent: rec.signedContent,
      issue: rec.document,
      suggestedInterval: null,
    };
    const forgedPdf = renderCertificate(data).pdf;
    const r = await verify(forgedPdf);
    expect(r.ok).toBe(false);
    expect(failures(r).join('\n')).toMatch(
      /signature "reviewed" by Maren Holt-Ibsen: the signing key is not Maren Holt-Ibsen's: key [0-9a-f]{16}… is not registered in the lab/,
    );
    // The performer's signature still holds: the report says which one fails.
    expect(r.findings.find((f) => f.check === 'signature "performed" by Ravi Ostrander')?.status).toBe('ok');

    // Case 2: the reviewer's fingerprint is named, but another person (Alba) made the signature.
    const signers = await demo.lab.api.listSigners();
    const alba = signers.find((s) => s.person.name === ALBA.name);
    expect(alba).toBeDefined();
    const named = { ...reviewed };
    const payload2 = signaturePayload(rec.signedContent, named, signaturesBefore(rec.signatures, named));
    const impostor = generateKeyPairSync('ed25519');
    named.signatureB64 = sign(null, payload2, impostor.privateKey).toString('base64');
    const r2 = await verify(
      renderCertificate({
        ...data,
        signatures: rec.signatures.map((s) => (s.meaning === 'reviewed' ? named : s)),
      }).pdf,
    );
    expect(failures(r2).join('\n')).toMatch(
      /signature "reviewed" by Maren Holt-Ibsen: does not verify with Maren Holt-Ibsen's public key/,
    );

    // Case 3: signed with Alba's registered key while claiming Maren.
    const albaKey = { ...reviewed, keyFingerprint: alba?.keyFingerprint ?? '' };
    albaKey.payloadSha256 = sha256Hex(
      signaturePayload(rec.signedContent, albaKey, signaturesBefore(rec.signatures, albaKey)),
    );
    const r3 = await verify(
      renderCertificate({
        ...data,
        signatures: rec.signatures.map((s) => (s.meaning === 'reviewed' ? albaKey : s)),
      }).pdf,
    );
    expect(failures(r3).join('\n')).toMatch(
      /the signing key is not Maren Holt-Ibsen's: key [0-9a-f]{16}… belongs to Alba Quennell/,
    );
  });

  it('the CLI says plainly what holds and exits 1 on a mismatch', async () => {
    const good = writeTemp(demo.dir, 'good.pdf', pdf);
    const changed = Buffer.from(pdf);
    // A damaged attached record (the first stream of the file) must still be reported as a change.
    changed[2000] = (changed[2000] as number) ^ 0x20;
    const bad = writeTemp(demo.dir, 'bad.pdf', changed);
    const o = io(demo.dir);
    // The lab file is closed by nobody else here: the CLI opens it read-write like any command.
    expect(await runCli(['--db', demo.file, 'verify', good], o)).toBe(0);
    expect(o.stdout.join('\n')).toMatch(/VERIFIED: everything checked holds/);
    expect(o.stdout.join('\n')).toMatch(/ok {4}signature "reviewed" by Maren Holt-Ibsen/);
    const o2 = io(demo.dir);
    expect(await runCli(['--db', demo.file, 'verify', bad], o2)).toBe(1);
    expect(o2.stdout.join('\n')).toMatch(
      /FAIL {2}file unchanged: the file has been changed since it was issued/,
    );
    expect(o2.stdout.join('\n')).toMatch(/FAIL {2}embedded record: .*damaged/);
    expect(o2.stdout.join('\n')).toMatch(/NOT VERIFIED/);
    const o3 = io(demo.dir);
    expect(await runCli(['--db', path.join(demo.dir, 'none.dipledger'), 'verify', good], o3)).toBe(0);
    expect(o3.stdout.join('\n')).toMatch(/no lab file: checked against the document alone/);
  });

  it('the CLI issues documents and worksheets to files', async () => {
    const o = io(demo.dir);
    const out = path.join(demo.dir, 'sheet-cli.pdf');
    expect(await runCli(['--db', demo.file, 'sheet', String(demo.newestCheckId), '--out', out], o)).toBe(0);
    expect(readFileSync(out).subarray(0, 5).toString()).toBe('%PDF-');
    expect(o.stdout.join('\n')).toMatch(
      /check-sheet S-2026-\d{4} revision 1: check \d+ revision 1 of WG-201/,
    );
    const o2 = io(demo.dir);
    expect(await runCli(['--db', demo.file, 'sheet', String(demo.newestCheckId), '--out', out], o2)).toBe(2);
    expect(o2.stderr.join('\n')).toMatch(/already has check-sheet .* give the reason/);
    const o3 = io(demo.dir);
    const ws = path.join(demo.dir, 'ws-cli.pdf');
    expect(await runCli(['--db', demo.file, 'worksheet', 'WG-202', '--out', ws], o3)).toBe(0);
    expect(readFileSync(ws).length).toBeGreaterThan(10000);
    const o4 = io(demo.dir);
    expect(await runCli(['--db', demo.file, 'certificate', 'x7', '--out', out], o4)).toBe(2);
    expect(o4.stderr.join('\n')).toMatch(/CHECK: "x7" is not a check number/);
  });
});

describe.skipIf(!HAS_POPPLER)('embedded PDF signature (PKCS#12)', () => {
  it('pdfsig reports it valid, and the lab still verifies the file', async () => {
    const p12 = throwawayP12('p12-passphrase');
    const d = await demo.lab.api.issueSheet({
      checkId: demo.adjustedCheckId,
      pdfSignature: { p12Base64: p12.toString('base64'), passphrase: 'p12-passphrase' },
    });
    expect(d.pdfSigned).toBe(true);
    const file = writeTemp(demo.dir, 'signed.pdf', Buffer.from(d.pdfBase64, 'base64'));
    const sig = run('pdfsig', [file]);
    expect(sig.out).toMatch(/Signature #1/);
    expect(sig.out).toMatch(/Signature Validation: Signature is Valid\./);
    const r = await verify(Buffer.from(d.pdfBase64, 'base64'));
    expect(failures(r)).toEqual([]);
    expect(r.findings.find((f) => f.check === 'PDF signature')?.detail).toMatch(/covering the whole file/);
    // The PKCS#12's certificate is kept as one the lab signs with.
    expect(r.findings.find((f) => f.check === "PDF signature is the lab's")?.status).toBe('ok');
    // A changed byte breaks the PDF signature too.
    const changed = Buffer.from(d.pdfBase64, 'base64');
    changed[1500] = (changed[1500] as number) ^ 0x01;
    expect(run('pdfsig', [writeTemp(demo.dir, 'signed-bad.pdf', changed)]).out).not.toMatch(
      /Signature is Valid\./,
    );
  });

  it('a wrong PKCS#12 passphrase is refused naming the field, and nothing is issued', async () => {
    const before = await demo.lab.api.listDocuments();
    const p12 = throwawayP12('right-one');
    await expect(
      demo.lab.api.issueCertificate({
        checkId: demo.adjustedCheckId,
        replaceReason: 'test of a refused signature',
        pdfSignature: { p12Base64: p12.toString('base64'), passphrase: 'wrong-one' },
      }),
    ).rejects.toMatchObject({ issues: [expect.objectContaining({ field: 'pdfSignature' })] });
    expect(await demo.lab.api.listDocuments()).toEqual(before);
  });
});
