// A certificate altered by someone who has the file (and perhaps a PDF editor and a key of their
// own) must be refused by `verify`, with and without the lab file: visible text changed in a
// page's content stream, a content stream damaged, one certificate's pages joined to another's
// record, an incremental update that edits the embedded record and fixes its digest, bytes
// appended after %%EOF, and the PDF signature stripped. Where a forger could re-sign with their
// own key, the altered file is also re-signed: then only the certificate (with the lab file) and
// the redrawing of the pages (with or without it) stand between the forgery and VERIFIED.
// poppler's pdfsig must report the signature as issued valid and covering the whole document.
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { IssuedDocumentFile } from '../../app/api/contract-documents';
import { signPdf } from '../../app/documents/pades';
import { readPdf } from '../../app/documents/pdfread';
import { decodeRecord, encodeRecord, sha256Hex, type EmbeddedRecord } from '../../app/documents/record';
import { verifyDocumentBytes, type VerifyReport } from '../../app/documents/verify';
import { signed } from '../../app/documents/words';
import { labSigner, makeDocumentKey, type DocumentSigner } from '../../app/signing/document-key';
import { demoLab, HAS_POPPLER, run, writeTemp, type DemoLab } from './fixture';

const HAS_QPDF = spawnSync('qpdf', ['--version'], { encoding: 'utf8' }).error === undefined;
if (!HAS_QPDF) console.warn('qpdf not found: the visible-text tamper case is skipped');

let demo: DemoLab;
let cert: IssuedDocumentFile;
let other: IssuedDocumentFile;
let pdf: Buffer;
let otherPdf: Buffer;
let forger: DocumentSigner;

beforeAll(async () => {
  demo = await demoLab();
  cert = await demo.lab.api.issueCertificate({ checkId: demo.adjustedCheckId });
  other = await demo.lab.api.issueCertificate({ checkId: demo.newestCheckId });
  pdf = Buffer.from(cert.pdfBase64, 'base64');
  otherPdf = Buffer.from(other.pdfBase64, 'base64');
  forger = labSigner(await makeDocumentKey('Kestrel Row Microwave Laboratory', '2026-12-01T09:30:00.000Z'));
}, 120_000);
afterAll(() => demo.lab.close());

const withLab = (bytes: Buffer) => demo.lab.api.verifyDocument({ pdfBase64: bytes.toString('base64') });
const failures = (r: VerifyReport) =>
  r.findings.filter((f) => f.status === 'fail').map((f) => `${f.check}: ${f.detail}`);
const recordOf = (bytes: Buffer) =>
  decodeRecord(readPdf(bytes).files[0]?.bytes ?? Buffer.alloc(0)) as EmbeddedRecord;

/** The signature value and byte range put back to the placeholder, so a forger can sign again. */
function unsign(bytes: Buffer): Buffer {
  const t = bytes
    .toString('latin1')
    .replace(/\/ByteRange\s*\[[^\]]*\]/, (m) =>
      '/ByteRange [0 /********** /********** /**********]'.padEnd(m.length),
    )
    .replace(/\/Contents\s*<([0-9a-fA-F]+)>/, (_m, h: string) => `/Contents <${'0'.repeat(h.length)}>`);
  return Buffer.from(t, 'latin1');
}
const resign = (bytes: Buffer) => signPdf(unsign(bytes), forger);

/** Code -> text of each font's ToUnicode map (pdfkit writes bfrange arrays of UTF-16BE). */
function toUnicodeMaps(qdf: string): Map<string, string>[] {
  return [...qdf.matchAll(/beginbfrange([^]*?)endbfrange/g)].map((m) => {
    const map = new Map<string, string>();
    for (const r of (m[1] ?? '').matchAll(/<([0-9a-f]{4})>\s*<[0-9a-f]{4}>\s*\[([^\]]*)\]/gi)) {
      const start = parseInt(r[1] ?? '0', 16);
      // An entry may hold several characters (a ligature: <0066 0069>).
      [...(r[2] ?? '').matchAll(/<([0-9a-f ]+)>/gi)].forEach((u, i) => {
        const text = Buffer.from((u[1] ?? '').replace(/ /g, ''), 'hex')
          .swap16()
          .toString('utf16le');
        map.set(text, (start + i).toString(16).padStart(4, '0'));
      });
    }
    return map;
  });
}

/** Changes the first digit of a visible number in a page's content stream to another digit
 * the font's subset has (qpdf uncompresses the file first). */
function changeVisibleText(bytes: Buffer, from: string): Buffer {
  const dir = demo.dir;
  const src = writeTemp(dir, 'visible-src.pdf', bytes);
  const qdfFile = path.join(dir, 'visible.qdf.pdf');
  expect(spawnSync('qpdf', ['--qdf', '--object-streams=disable', src, qdfFile]).status).not.toBe(2);
  const qdf = readFileSync(qdfFile).toString('latin1');
  for (const map of toUnicodeMaps(qdf)) {
    const enc = (s: string) => [...s].map((c) => map.get(c) ?? 'xxxx').join('');
    const a = enc(from);
    if (a.includes('xxxx') || !qdf.includes(a)) continue;
    for (const d of '9876543210') {
      const to = from.replace(/\d/, d);
      const b = enc(to);
      if (to === from || b.includes('xxxx')) continue;
      return Buffer.from(qdf.replace(a, b), 'latin1');
    }
  }
  throw new Error(`"${from}" is not in any content stream`);
}

/** Fixes a qdf file's offsets and lengths after an edit (qpdf's fix-qdf). */
function fixQdf(bytes: Buffer): Buffer {
  const r = spawnSync('fix-qdf', [writeTemp(demo.dir, 'fix.qdf.pdf', bytes)]);
  return Buffer.from(r.stdout);
}

/** One certificate's embedded record stream replaced by another's, as bytes in place. */
function joinRecord(target: Buffer, source: Buffer): Buffer {
  const streamObject = (b: Buffer) => {
    const t = b.toString('latin1');
    const at = t.indexOf('/Type /EmbeddedFile');
    const objStart = t.lastIndexOf('\n', t.lastIndexOf(' 0 obj', at)) + 1;
    const end = t.indexOf('endobj', at) + 'endobj'.length;
    return {
      objStart,
      end,
      head: t.slice(objStart, t.indexOf(' 0 obj', objStart)),
      body: t.slice(t.indexOf(' 0 obj', objStart), end),
    };
  };
  const a = streamObject(target);
  const b = streamObject(source);
  let out = Buffer.concat([
    target.subarray(0, a.objStart),
    Buffer.from(`${a.head}${b.body}`, 'latin1'),
    target.subarray(a.end),
  ]);
  // The forger also writes the joined record's digest where the document states it.
  out = Buffer.from(out.toString('latin1').replace(recordShaOf(target), recordShaOf(source)), 'latin1');
  return out;
}
const recordShaOf = (b: Buffer) => readPdf(b).info.DipledgerRecordSha256 ?? '';

/** An incremental update: a new record stream (with an edited remark) and an information
 * dictionary stating the new record's digest, appended after %%EOF with its own xref. */
function incrementalUpdate(bytes: Buffer): Buffer {
  const t = bytes.toString('latin1');
  const ef = /\/EF\s*<<\s*\/F (\d+) 0 R/.exec(t)?.[1];
  const info = /\/Info (\d+) 0 R/.exec(t.slice(t.lastIndexOf('trailer')))?.[1];
  const root = /\/Root (\d+) 0 R/.exec(t.slice(t.lastIndexOf('trailer')))?.[1];
  const size = /\/Size (\d+)/.exec(t.slice(t.lastIndexOf('trailer')))?.[1];
  const prev = /startxref\s+(\d+)/.exec(t.slice(t.lastIndexOf('startxref')))?.[1];
  if (!ef || !info || !root || !size || !prev) throw new Error('not a pdfkit file');
  const rec = recordOf(bytes);
  rec.remarks = `${rec.remarks} Re-checked and found in tolerance.`;
  const recordBytes = encodeRecord(rec);
  const infoStart = t.indexOf(`\n${info} 0 obj`) + 1;
  const infoDict = t
    .slice(infoStart, t.indexOf('endobj', infoStart))
    .replace(/^\d+ 0 obj\s*/, '')
    .replace(recordShaOf(bytes), sha256Hex(recordBytes));
  const parts: Buffer[] = [bytes];
  let at = bytes.length;
  const push = (s: string | Buffer) => {
    const b = typeof s === 'string' ? Buffer.from(s, 'latin1') : s;
    parts.push(b);
    at += b.length;
  };
  push('\n');
  const efAt = at;
  push(
    `${ef} 0 obj\n<< /Type /EmbeddedFile /Subtype /application#2Fjson /Length ${recordBytes.length} >>\nstream\n`,
  );
  push(recordBytes);
  push('\nendstream\nendobj\n');
  const infoAt = at;
  push(`${info} 0 obj\n${infoDict}endobj\n`);
  const xrefAt = at;
  const entry = (n: number) => `${String(n).padStart(10, '0')} 00000 n \n`;
  push(`xref\n0 1\n0000000000 65535 f \n${ef} 1\n${entry(efAt)}${info} 1\n${entry(infoAt)}`);
  push(
    `trailer\n<< /Size ${size} /Root ${root} 0 R /Info ${info} 0 R /Prev ${prev} >>\nstartxref\n${xrefAt}\n%%EOF\n`,
  );
  return Buffer.concat(parts);
}

/** A byte inside a page's content stream flipped (the stream no longer inflates as drawn). */
function damageContentStream(bytes: Buffer): Buffer {
  const t = bytes.toString('latin1');
  const pages = [...t.matchAll(/\/Type \/Page\b[^]*?\/Contents (\d+) 0 R/g)];
  const contents = pages[1]?.[1] ?? pages[0]?.[1];
  const obj = t.indexOf(`\n${contents} 0 obj`);
  const at = t.indexOf('stream\n', obj) + 'stream\n'.length + 60;
  const out = Buffer.from(bytes);
  out[at] = (out[at] as number) ^ 0x5a;
  return out;
}

/** The PDF signature removed: its byte range entry renamed away and its value zeroed. */
function stripSignature(bytes: Buffer): Buffer {
  const t = bytes
    .toString('latin1')
    .replace('/ByteRange', '/Unsigned_')
    .replace(/\/Contents\s*<([0-9a-fA-F]+)>/, (_m, h: string) => `/Contents <${'0'.repeat(h.length)}>`);
  return Buffer.from(t, 'latin1');
}

interface Case {
  name: string;
  make: () => Promise<Buffer> | Buffer;
  /** What the refusal must say, without and with the lab file. */
  standalone: RegExp;
  lab: RegExp;
  needsQpdf?: boolean;
}

const firstErrorText = () => {
  const p = recordOf(pdf).record.points[0];
  if (!p) throw new Error('no point');
  // The digits only: a kerned TJ may put the sign in a string of its own.
  return signed(p.result.errorPpm, 1).replace(/^[^0-9]+/, '');
};

const CASES: Case[] = [
  {
    name: 'visible error changed in the content stream',
    make: () => fixQdf(changeVisibleText(pdf, firstErrorText())),
    standalone: /PDF signature: .*|pages show the record: the content of page/,
    lab: /file unchanged: the file has been changed/,
    needsQpdf: true,
  },
  {
    name: 'visible error changed, then re-signed with a key of the forger',
    make: () => resign(fixQdf(changeVisibleText(pdf, firstErrorText()))),
    standalone:
      /embedded record: .* is damaged|embedded record: .* is not valid JSON|pages show the record: /,
    lab: /PDF signature is the lab's: .* has never signed documents with the certificate/,
    needsQpdf: true,
  },
  {
    name: "a page's content stream damaged",
    make: () => damageContentStream(pdf),
    standalone: /PDF signature: the signed bytes have changed/,
    lab: /file unchanged: the file has been changed/,
  },
  {
    name: "a page's content stream damaged, then re-signed",
    make: () => resign(damageContentStream(pdf)),
    standalone: /pages show the record: the content of page \d differs/,
    lab: /PDF signature is the lab's: .* has never signed/,
  },
  {
    name: "one certificate's pages joined to another's record (digest fixed)",
    make: () => joinRecord(pdf, otherPdf),
    standalone:
      /PDF signature: the signature byte range does not describe this file|PDF signature: the signed bytes have changed/,
    lab: /record is the issued check: the attached record is check/,
  },
  {
    name: "pages joined to another's record, digest fixed, then re-signed",
    make: () => resign(joinRecord(pdf, otherPdf)),
    standalone:
      /embedded record: .* is damaged|embedded record: .* is not valid JSON|pages show the record: /,
    lab: /PDF signature is the lab's: .* has never signed/,
  },
  {
    name: 'incremental update that edits the record and fixes its digest',
    make: () => incrementalUpdate(pdf),
    standalone:
      /PDF signature: the signature does not cover the whole file: \d+ bytes were added after it was signed/,
    lab: /PDF signature: the signature does not cover the whole file/,
  },
  {
    name: 'bytes appended after %%EOF',
    make: () => Buffer.concat([pdf, Buffer.from('% appended after the end\n', 'latin1')]),
    standalone: /PDF signature: the signature does not cover the whole file: 25 bytes were added/,
    lab: /file unchanged: the file has been changed/,
  },
  {
    name: 'PDF signature stripped',
    make: () => stripSignature(pdf),
    standalone: /PDF signature: the file carries no PDF signature/,
    lab: /PDF signature: the file carries no PDF signature/,
  },
];

describe('certificate tamper suite', () => {
  it('the certificate as issued verifies with and without the lab file', async () => {
    const standalone = verifyDocumentBytes(pdf);
    expect(failures(standalone)).toEqual([]);
    expect(standalone.findings.find((f) => f.check === 'pages show the record')?.status).toBe('ok');
    const lab = await withLab(pdf);
    expect(failures(lab)).toEqual([]);
    expect(lab.findings.find((f) => f.check === "PDF signature is the lab's")?.status).toBe('ok');
  });

  const tally = { altered: 0, refusedStandalone: 0, refusedWithLab: 0 };
  for (const c of CASES) {
    it.skipIf(c.needsQpdf && !HAS_QPDF)(
      `refused: ${c.name}`,
      async () => {
        const bytes = await c.make();
        expect(bytes.equals(pdf)).toBe(false);
        tally.altered++;
        const standalone = verifyDocumentBytes(bytes);
        expect(standalone.ok).toBe(false);
        expect(failures(standalone).join('\n')).toMatch(c.standalone);
        tally.refusedStandalone++;
        const lab = await withLab(bytes);
        expect(lab.ok).toBe(false);
        expect(failures(lab).join('\n')).toMatch(c.lab);
        tally.refusedWithLab++;
      },
      60_000,
    );
  }

  afterAll(() => {
    console.log(
      `certificate tamper suite: ${tally.altered} documents altered; refused ${tally.refusedStandalone} without the lab file, ${tally.refusedWithLab} with it`,
    );
  });
});

describe.skipIf(!HAS_POPPLER)('pdfsig', () => {
  it('reports the signature of an issued certificate valid and covering the whole document', () => {
    const out = run('pdfsig', [writeTemp(demo.dir, 'issued.pdf', pdf)]).out;
    expect(out).toMatch(/Signature Type: ETSI\.CAdES\.detached/);
    expect(out).toMatch(/Total document signed/);
    expect(out).toMatch(/Signature Validation: Signature is Valid\./);
  });

  it('reports appended bytes as not covered, and a changed byte as invalid', () => {
    const appended = run('pdfsig', [
      writeTemp(demo.dir, 'appended.pdf', Buffer.concat([pdf, Buffer.from('% more\n')])),
    ]).out;
    expect(appended).not.toMatch(/Total document signed/);
    const changed = Buffer.from(pdf);
    changed[1500] = (changed[1500] as number) ^ 0x01;
    expect(run('pdfsig', [writeTemp(demo.dir, 'changed.pdf', changed)]).out).not.toMatch(
      /Signature is Valid\./,
    );
  });
});
