// The Digital Calibration Certificate (DCC) a certificate carries: valid against the published
// schemas (DCC 3.1.2 with D-SI 2.1.0, in test/data/dcc with their LGPL licence and provenance)
// as checked by a real XML Schema validator, xmllint from libxml2; for every check of the demo
// lab, for certificates issued through the API and for fast-check generated checks. Read back,
// every number equals the record; a DCC whose numbers differ makes `verify` say NOT VERIFIED.
// The CLI writes it with the certificate (--dcc) and for a certificate already issued (dcc).
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CheckRecord } from '../../app/api/contract';
import type { IssuedDocumentFile } from '../../app/api/contract-documents';
import { runCli, type CliIo } from '../../app/cli/main';
import { CERTIFICATE_TITLE, closeIssued, openIssued } from '../../app/documents/certificate';
import {
  buildDcc,
  CONFORMITY_CODE,
  DccError,
  dccAttachment,
  dccFileName,
  REF,
} from '../../app/documents/dcc';
import { compareDcc, readDcc } from '../../app/documents/dcc-read';
import { DCC_FINDING } from '../../app/documents/dcc-verify';
import { standardsUsed, type CheckDocumentData } from '../../app/documents/model';
import { readPdf } from '../../app/documents/pdfread';
import { decodeRecord, type EmbeddedRecord } from '../../app/documents/record';
import { verifyDocumentBytes } from '../../app/documents/verify';
import { clock } from '../fixtures/lab';
import { MAREN, RAVI, demoLab, writeTemp, type DemoLab } from './fixture';

const SCHEMA_DIR = path.resolve('test/data/dcc');
const SCHEMA = path.join(SCHEMA_DIR, 'dcc.xsd');
const HAS_XMLLINT = spawnSync('xmllint', ['--version'], { encoding: 'utf8' }).error === undefined;
const NO_XMLLINT =
  'xmllint not found: install Debian libxml2-utils (apt-get install -y libxml2-utils; .ci/run does)';

/** Validates files with xmllint against DCC 3.1.2; returns the files that failed, with why. */
function xmllint(files: string[]): string[] {
  expect(HAS_XMLLINT, NO_XMLLINT).toBe(true);
  const failed: string[] = [];
  for (let i = 0; i < files.length; i += 100) {
    const batch = files.slice(i, i + 100);
    const r = spawnSync('xmllint', ['--noout', '--schema', SCHEMA, ...batch], {
      encoding: 'utf8',
      maxBuffer: 64 * 1024 * 1024,
    });
    const out = `${r.stdout}${r.stderr}`;
    for (const f of batch) if (!out.includes(`${f} validates`)) failed.push(`${f}: ${out.slice(0, 2000)}`);
  }
  return failed;
}

/** One value by XPath, read by libxml2 (a second parser, independent of the program's reader). */
function xpath(file: string, expr: string): string {
  const r = spawnSync('xmllint', ['--xpath', `string(${expr})`, file], { encoding: 'utf8' });
  return r.stdout.trim();
}

function dccOf(pdf: Buffer): { name: string; bytes: Buffer } {
  const f = readPdf(pdf).files.find((x) => x.name.endsWith('-dcc.xml'));
  if (!f) throw new Error('the certificate carries no DCC');
  return f;
}

function recordOf(pdf: Buffer): EmbeddedRecord {
  const f = readPdf(pdf).files[0];
  if (!f) throw new Error('no record attached');
  return decodeRecord(f.bytes) as EmbeddedRecord;
}

function io(cwd: string): CliIo & { stdout: string[]; stderr: string[] } {
  const stdout: string[] = [];
  const stderr: string[] = [];
  return { stdout, stderr, out: (t) => stdout.push(t), err: (t) => stderr.push(t), env: {}, cwd, clock };
}

let demo: DemoLab;
let cert: IssuedDocumentFile;
let certPdf: Buffer;
let microCert: IssuedDocumentFile;
let outDir: string;

/** The document data of a check as a certificate would be built from it (no issue record). */
async function documentData(checkId: number, signatures: CheckDocumentData['signatures'] = []) {
  const check = await demo.lab.api.getCheck(checkId);
  const data: CheckDocumentData = {
    lab: await demo.lab.api.getLab(),
    meter: (await demo.lab.api.getMeter(check.meterAssetId)).meter,
    check,
    standards: standardsUsed(check, await demo.lab.api.listStandards()),
    signatures,
    signedContent: null,
    issue: {
      kind: 'certificate',
      number: `C-2026-${String(9000 + checkId)}`,
      revision: 1,
      issuedAt: '2026-12-01T09:00:00.000Z',
      issuedBy: 'test',
      replaces: null,
    },
    suggestedInterval: null,
  };
  return data;
}

beforeAll(async () => {
  demo = await demoLab();
  outDir = path.join(demo.dir, 'dcc');
  mkdirSync(outDir, { recursive: true });
  cert = await demo.lab.api.issueCertificate({ checkId: demo.adjustedCheckId });
  certPdf = Buffer.from(cert.pdfBase64, 'base64');
  // A micrometer (divisions) meter too: sign its newest check and issue its certificate.
  const cw = (await demo.lab.api.getMeter('CW-102')).checks;
  const newest = cw.reduce((a, b) => (b.date > a.date ? b : a));
  await demo.lab.api.signCheck({ checkId: newest.checkId, person: RAVI.name, passphrase: RAVI.passphrase });
  await demo.lab.api.signCheck({ checkId: newest.checkId, person: MAREN.name, passphrase: MAREN.passphrase });
  microCert = await demo.lab.api.issueCertificate({ checkId: newest.checkId });
}, 120_000);
afterAll(() => demo.lab.close());

describe('the schemas shipped with the tests', () => {
  it('xmllint is there to validate with (Debian libxml2-utils)', () => {
    expect(HAS_XMLLINT, NO_XMLLINT).toBe(true);
  });

  it('are the files their README names, with the LGPL text beside them', () => {
    const sha = (f: string) =>
      createHash('sha256')
        .update(readFileSync(path.join(SCHEMA_DIR, f)))
        .digest('hex');
    const readme = readFileSync(path.join(SCHEMA_DIR, 'README.md'), 'utf8');
    expect(readme).toContain(sha('dcc.xsd'));
    expect(readme).toContain(sha('SI_Format.xsd'));
    expect(readFileSync(path.join(SCHEMA_DIR, 'COPYING.LESSER'), 'utf8')).toMatch(
      /GNU LESSER GENERAL PUBLIC LICENSE\s+Version 3/,
    );
    // The import points at the local D-SI file, so validation needs no network.
    expect(readFileSync(SCHEMA, 'utf8')).toMatch(/schemaLocation="SI_Format\.xsd"/);
  });
});

describe('the certificate carries its DCC (hybrid certificate)', () => {
  it('as a PDF/A-3 associated file beside the record, named for the certificate', () => {
    const files = readPdf(certPdf).files;
    expect(files.map((f) => f.name)).toEqual([cert.recordName, `${cert.number}-r1-dcc.xml`]);
    expect(files[0]?.relationship).toBe('Source');
    expect(files[1]?.relationship).toBe('Alternative');
    expect(readFileSync(writeTemp(demo.dir, 'c.pdf', certPdf)).toString('latin1')).toMatch(
      /\/Subtype \/application#2Fxml/,
    );
  });

  it('validates against DCC 3.1.2 (xmllint), for a direct-reading and a micrometer meter', () => {
    const files = [cert, microCert].map((c) =>
      writeTemp(outDir, `${c.number}.xml`, dccOf(Buffer.from(c.pdfBase64, 'base64')).bytes),
    );
    expect(xmllint(files)).toEqual([]);
  });

  it('reads back: every number of every point, the conditions and the verdicts equal the record', () => {
    const rec = recordOf(certPdf).record;
    const d = readDcc(dccOf(certPdf).bytes);
    expect(d.schemaVersion).toBe('3.1.2');
    expect(d.certificateNumber).toBe(cert.number);
    expect(d.certificateRevision).toBe('1');
    expect(d.performanceDate).toBe(rec.date);
    expect(rec.adjusted).toBe(true);
    expect(d.points.length).toBe(rec.points.length);
    for (const p of rec.points) {
      const q = d.points.find((x) => x.seq === p.seq);
      expect(q?.phase).toBe(p.phase);
      expect(q?.reference).toMatchObject({ value: p.referenceHz, unit: '\\hertz' });
      expect(q?.indication).toMatchObject({ value: p.result.indicatedHz, unit: '\\hertz' });
      expect(q?.corrected).toMatchObject({ value: p.result.correctedHz, unit: '\\hertz' });
      expect(q?.error).toEqual({
        value: p.result.errorHz,
        unit: '\\hertz',
        uncertainty: p.result.budget.expandedHz,
        coverageFactor: p.result.budget.coverageFactor,
        coverageProbability: p.result.budget.coverageProbability,
      });
      expect(q?.conformity).toBe(CONFORMITY_CODE[p.result.decision.verdict]);
      expect(q?.tolerance?.value).toBe(p.result.decision.toleranceHz);
      expect(q?.acceptanceLimit?.value).toBe(p.result.decision.acceptanceLimitHz);
      expect(q?.probabilityOfConformity).toMatchObject({
        value: p.result.decision.probabilityOfConformity,
        unit: '\\one',
      });
    }
    const c = rec.conditions;
    expect(d.conditions.length).toBe(2); // as found and as left
    for (const k of d.conditions) {
      expect(k.temperature).toMatchObject({ value: c.temperatureC, unit: '\\degreecelsius' });
      expect(k.temperature?.uncertainty).toBe(c.temperatureUncertaintyC);
      expect(k.temperature?.coverageFactor).toBe(1);
      expect(k.pressure).toMatchObject({ value: c.pressureHpa, unit: '\\hecto\\pascal' });
      expect(k.pressure?.uncertainty).toBe(c.pressureUncertaintyHpa);
      expect(k.humidity).toMatchObject({ value: c.humidityPct, unit: '\\percent' });
      expect(k.humidity?.uncertainty).toBe(c.humidityUncertaintyPct);
    }
    expect(d.conformity.asFound).toBe(rec.asFoundVerdict && CONFORMITY_CODE[rec.asFoundVerdict]);
    expect(d.conformity.asLeft).toBe(rec.asLeftVerdict && CONFORMITY_CODE[rec.asLeftVerdict]);
    expect(compareDcc(d, rec, { number: cert.number, revision: 1 })).toEqual([]);
  });

  it('a second parser (libxml2 XPath) reads the same errors and uncertainties', () => {
    expect(HAS_XMLLINT, NO_XMLLINT).toBe(true);
    const rec = recordOf(certPdf).record;
    const file = writeTemp(outDir, 'xpath.xml', dccOf(certPdf).bytes);
    for (const p of rec.points.slice(0, 4)) {
      const q = `//*[local-name()='result'][@id='point-${p.seq}']//*[local-name()='quantity'][@refType='${REF.error}']/*[local-name()='real']`;
      expect(Number(xpath(file, `${q}/*[local-name()='value']`))).toBe(p.result.errorHz);
      expect(Number(xpath(file, `${q}/*[local-name()='expandedUnc']/*[local-name()='uncertainty']`))).toBe(
        p.result.budget.expandedHz,
      );
      expect(xpath(file, `${q}/*[local-name()='unit']`)).toBe('\\hertz');
    }
    // Administrative data: the lab, the meter and the people, named as the standard names them.
    expect(xpath(file, "//*[local-name()='calibrationLaboratory']//*[local-name()='content']")).toBe(
      'Kestrel Row Microwave Laboratory',
    );
    expect(
      xpath(file, "//*[local-name()='item']//*[local-name()='identification']/*[local-name()='value']"),
    ).toBe('WG-201');
    expect(xpath(file, "count(//*[local-name()='respPerson'])")).toBe('2');
    expect(
      xpath(
        file,
        "//*[local-name()='respPerson'][*[local-name()='mainSigner']='true']//*[local-name()='content']",
      ),
    ).toBe(MAREN.name);
    expect(
      xpath(
        file,
        `//*[local-name()='statement'][contains(@refType,'${REF.decisionRule}')]/*[local-name()='norm']`,
      ),
    ).toBe('ILAC-G8:09/2019');
    expect(
      xpath(file, "count(//*[local-name()='usedMethod']/*[local-name()='norm'][.='JCGM 100:2008'])"),
    ).toBe('2');
  });

  it('is the example in docs/examples/dcc.xml, which validates', () => {
    const example = path.resolve('docs/examples/dcc.xml');
    // DIPLEDGER_WRITE_EXAMPLES=1 writes the example afresh after a deliberate change of the writer.
    if (process.env.DIPLEDGER_WRITE_EXAMPLES === '1') writeFileSync(example, dccOf(certPdf).bytes);
    // Signing keys are made afresh for each run: their fingerprints are the one part that differs.
    const keyless = (b: Buffer) => b.toString('utf8').replace(/SHA-256 [0-9a-f]{64}/g, 'SHA-256 (key)');
    expect(
      keyless(readFileSync(example)) === keyless(dccOf(certPdf).bytes),
      'docs/examples/dcc.xml differs from the DCC of the demo certificate: if the writer changed on purpose, run this test with DIPLEDGER_WRITE_EXAMPLES=1',
    ).toBe(true);
    expect(xmllint([example])).toEqual([]);
  });

  it('is the same bytes each time the same record is rendered', async () => {
    const rec = recordOf(certPdf);
    const data = {
      ...(await documentData(rec.record.checkId, rec.signatures)),
      check: rec.record,
      signedContent: rec.signedContent,
      issue: rec.document,
    };
    expect(buildDcc(data).equals(dccOf(certPdf).bytes)).toBe(true);
  });
});

describe('every check of the demo lab', () => {
  it('writes a DCC that validates and reads back to the record', async () => {
    const meters = await demo.lab.api.listMeters();
    const files: string[] = [];
    let points = 0;
    for (const m of meters)
      for (const c of (await demo.lab.api.getMeter(m.assetId)).checks) {
        const data = await documentData(c.checkId);
        const bytes = buildDcc(data);
        expect(compareDcc(readDcc(bytes), data.check, data.issue)).toEqual([]);
        points += data.check.points.length;
        files.push(writeTemp(outDir, dccFileName(data), bytes));
      }
    expect(files.length).toBeGreaterThanOrEqual(160);
    expect(points).toBeGreaterThan(files.length);
    expect(xmllint(files)).toEqual([]);
    console.info(
      `DCC: ${files.length} demo checks (${points} points) validated against DCC 3.1.2 by xmllint`,
    );
  }, 120_000);
});

describe('generated checks (fast-check)', () => {
  const RUNS = Number(process.env.DIPLEDGER_FUZZ_RUNS ?? 60);
  const finite = (min: number, max: number) => fc.double({ min, max, noNaN: true, noDefaultInfinity: true });
  const verdict = fc.constantFrom(...(Object.keys(CONFORMITY_CODE) as (keyof typeof CONFORMITY_CODE)[]));
  const anyText = fc.string({ maxLength: 40, unit: 'binary' });

  it('every DCC validates and reads back exactly, whatever the numbers and words', async () => {
    const base = await documentData(demo.adjustedCheckId);
    const template = base.check.points[0] as CheckRecord['points'][number];
    const point = fc.record({
      referenceHz: finite(1e8, 2e11),
      indicatedHz: finite(1e8, 2e11),
      correctedHz: finite(1e8, 2e11),
      errorHz: finite(-1e9, 1e9),
      expandedHz: finite(0, 1e9),
      k: finite(1, 1000),
      p: finite(0, 1),
      dof: fc.oneof(fc.constant(Number.POSITIVE_INFINITY), fc.integer({ min: 1, max: 1000 })),
      verdict,
      toleranceHz: finite(0, 1e9),
      acceptanceHz: finite(-1e9, 1e9),
      pc: finite(0, 1),
      phase: fc.constantFrom('as-found' as const, 'as-left' as const),
    });
    const generated = fc.record({
      points: fc.array(point, { minLength: 1, maxLength: 6 }),
      conditions: fc.record({
        temperatureC: finite(-50, 80),
        temperatureUncertaintyC: finite(0, 10),
        pressureHpa: finite(300, 1200),
        pressureUncertaintyHpa: finite(0, 50),
        humidityPct: finite(0, 100),
        humidityUncertaintyPct: finite(0, 20),
      }),
      labName: anyText,
      address: anyText,
      description: anyText,
      performer: anyText,
      remarks: anyText,
      adjusted: fc.boolean(),
      asFound: fc.option(verdict, { nil: null }),
      asLeft: fc.option(verdict, { nil: null }),
    });
    const files: string[] = [];
    fc.assert(
      fc.property(generated, (g) => {
        const check: CheckRecord = {
          ...base.check,
          conditions: g.conditions,
          performer: g.performer,
          remarks: g.remarks,
          adjusted: g.adjusted,
          asFoundVerdict: g.asFound,
          asLeftVerdict: g.asLeft,
          points: g.points.map((p, i) => ({
            ...template,
            seq: i + 1,
            phase: p.phase,
            referenceHz: p.referenceHz,
            result: {
              ...template.result,
              indicatedHz: p.indicatedHz,
              correctedHz: p.correctedHz,
              errorHz: p.errorHz,
              budget: {
                ...template.result.budget,
                expandedHz: p.expandedHz,
                coverageFactor: p.k,
                coverageProbability: p.p,
                effectiveDof: p.dof,
              },
              decision: {
                ...template.result.decision,
                verdict: p.verdict,
                toleranceHz: p.toleranceHz,
                acceptanceLimitHz: p.acceptanceHz,
                probabilityOfConformity: p.pc,
              },
            },
          })),
        };
        const data: CheckDocumentData = {
          ...base,
          lab: { ...base.lab, name: g.labName, address: g.address },
          meter: { ...base.meter, description: g.description },
          check,
          issue: { ...base.issue, number: `C-2026-F${files.length}` },
        };
        const bytes = buildDcc(data);
        expect(compareDcc(readDcc(bytes), check, data.issue)).toEqual([]);
        files.push(writeTemp(outDir, `fuzz-${files.length}.xml`, bytes));
      }),
      { numRuns: RUNS, seed: 20261203 },
    );
    expect(files.length).toBe(RUNS);
    expect(xmllint(files)).toEqual([]);
  }, 120_000);

  it('refuses a number D-SI cannot carry, naming the point and the quantity', async () => {
    const base = await documentData(demo.adjustedCheckId);
    const [first, ...others] = base.check.points as [CheckRecord['points'][number], ...CheckRecord['points']];
    const bad = { ...first, result: { ...first.result, errorHz: Number.NaN } };
    const data = { ...base, check: { ...base.check, points: [bad, ...others] } };
    expect(() => buildDcc(data)).toThrow(DccError);
    expect(() => buildDcc(data)).toThrow(`point ${first.seq} error: NaN cannot be written in a DCC`);
  });
});

describe('verify checks the DCC against the signed record', () => {
  const failures = (r: { findings: { status: string; check: string; detail: string }[] }) =>
    r.findings.filter((f) => f.status === 'fail').map((f) => `${f.check}: ${f.detail}`);

  it('says the DCC agrees on a certificate as issued, with and without the lab file', async () => {
    for (const r of [
      await demo.lab.api.verifyDocument({ pdfBase64: cert.pdfBase64 }),
      verifyDocumentBytes(certPdf),
    ]) {
      expect(failures(r)).toEqual([]);
      const f = r.findings.find((x) => x.check === DCC_FINDING);
      expect(f?.status).toBe('ok');
      expect(f?.detail).toMatch(/the \d+ points .* match the signed record/);
    }
  });

  it('says NOT VERIFIED, naming the point and both numbers, when a DCC number differs from the record', async () => {
    const rec = recordOf(certPdf);
    const data: CheckDocumentData = {
      ...(await documentData(rec.record.checkId, rec.signatures)),
      check: rec.record,
      signedContent: rec.signedContent,
      issue: rec.document,
    };
    const [first, ...others] = rec.record.points as [CheckRecord['points'][number], ...CheckRecord['points']];
    const changed = { ...first, result: { ...first.result, errorHz: first.result.errorHz + 1000 } };
    const forged = dccAttachment({ ...data, check: { ...rec.record, points: [changed, ...others] } });
    // The same record and identity, with a DCC whose error at the first point is 1 kHz off.
    const opened = openIssued(data, CERTIFICATE_TITLE, 'forged');
    opened.page.end('end');
    const pdf = closeIssued(opened.page, opened, data, [forged]).pdf;
    const r = verifyDocumentBytes(pdf);
    expect(r.ok).toBe(false);
    // (Unsigned and not what the record draws, it fails those checks too.)
    expect(failures(r)).toContain(
      `${DCC_FINDING}: the DCC ${forged.name} differs from the signed record: point ${first.seq} error: the DCC says ${first.result.errorHz + 1000} Hz, the record ${first.result.errorHz} Hz`,
    );
  });

  it('a check-sheet carries no DCC and verify does not ask for one', async () => {
    const sheet = await demo.lab.api.issueSheet({ checkId: demo.newestCheckId });
    const pdf = Buffer.from(sheet.pdfBase64, 'base64');
    expect(readPdf(pdf).files.map((f) => f.name)).toEqual([sheet.recordName]);
    const r = verifyDocumentBytes(pdf);
    expect(r.ok).toBe(true);
    expect(r.findings.some((f) => f.check === DCC_FINDING)).toBe(false);
    await expect(demo.lab.api.getDcc({ number: sheet.number, revision: sheet.revision })).rejects.toThrow(
      /number: this lab issued no certificate S-2026-\d{4} revision 1/,
    );
  });
});

describe('the CLI', () => {
  it('certificate --dcc writes the DCC beside the PDF; dcc writes the same bytes later', async () => {
    const c = io(demo.dir);
    const code = await runCli(
      ['--db', demo.file, 'certificate', String(demo.newestCheckId), '--out', 'n.pdf', '--dcc', 'n.xml'],
      c,
    );
    expect(c.stderr).toEqual([]);
    expect(code).toBe(0);
    expect(c.stdout.join('\n')).toMatch(/wrote .*n\.xml \(DCC, SHA-256 [0-9a-f]{64}\)/);
    const xml = readFileSync(path.join(demo.dir, 'n.xml'));
    expect(xml.equals(dccOf(readFileSync(path.join(demo.dir, 'n.pdf'))).bytes)).toBe(true);
    expect(xmllint([path.join(demo.dir, 'n.xml')])).toEqual([]);

    const later = io(demo.dir);
    expect(
      await runCli(['--db', demo.file, 'dcc', String(demo.newestCheckId), '--out', 'later.xml'], later),
    ).toBe(0);
    expect(readFileSync(path.join(demo.dir, 'later.xml')).equals(xml)).toBe(true);
    expect(later.stdout.join('\n')).toMatch(/^DCC of certificate C-2026-\d{4} revision 1/);

    const v = io(demo.dir);
    expect(await runCli(['--db', demo.file, 'verify', 'n.pdf'], v)).toBe(0);
    expect(v.stdout.join('\n')).toContain(`ok    ${DCC_FINDING}:`);
  });

  it('refuses, writing nothing: a check without a certificate, --dcc on a check-sheet, no --out', async () => {
    const a = io(demo.dir);
    expect(await runCli(['--db', demo.file, 'dcc', String(demo.draftCheckId), '--out', 'none.xml'], a)).toBe(
      2,
    );
    expect(a.stderr.join('\n')).toMatch(
      new RegExp(`check: check ${demo.draftCheckId} has no certificate`, 'i'),
    );
    expect(existsSync(path.join(demo.dir, 'none.xml'))).toBe(false);

    const b = io(demo.dir);
    const before = (await demo.lab.api.listDocuments({})).length;
    expect(
      await runCli(
        ['--db', demo.file, 'sheet', String(demo.adjustedCheckId), '--out', 's.pdf', '--dcc', 's.xml'],
        b,
      ),
    ).toBe(2);
    expect(b.stderr.join('\n')).toMatch(/--dcc applies to certificates only/);
    expect(existsSync(path.join(demo.dir, 's.pdf'))).toBe(false);
    expect((await demo.lab.api.listDocuments({})).length).toBe(before);

    const c = io(demo.dir);
    expect(await runCli(['--db', demo.file, 'dcc', String(demo.adjustedCheckId)], c)).toBe(2);
    expect(c.stderr.join('\n')).toMatch(/--out FILE\.xml is required/);
  });
});

describe('refusals of the API', () => {
  it('names the field when the query is neither a check nor a certificate number and revision', async () => {
    await expect(demo.lab.api.getDcc({ number: cert.number })).rejects.toThrow(
      /checkId: give either the check number, or the certificate number and revision together/,
    );
    await expect(demo.lab.api.getDcc({ checkId: 1.5 })).rejects.toThrow(/checkId/);
    await expect(demo.lab.api.getDcc({ checkId: 1, colour: 'red' } as never)).rejects.toThrow(/colour/);
    const byNumber = await demo.lab.api.getDcc({ number: cert.number, revision: 1 });
    expect(byNumber.xml).toBe(dccOf(certPdf).bytes.toString('utf8'));
    expect(byNumber.fileName).toBe(`${cert.number}-r1-dcc.xml`);
  });
});
