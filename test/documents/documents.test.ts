// Certificates, check-sheets and worksheets issued through the real API from the demo lab:
// the ISO/IEC 17025:2017 checklist found in the text (clause named beside each element), the
// archival form (PDF/A-3b, embedded fonts, the record attached), page images to look at,
// numbering and replacement (7.8.8), and the printed interval only where the lab agreed (7.8.4.3).
import { existsSync, readFileSync, statSync } from 'node:fs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { LabError } from '../../app/api/errors';
import type { IssuedDocumentFile } from '../../app/api/contract-documents';
import { renderCertificate } from '../../app/documents/certificate';
import { checkPdfSignature } from '../../app/documents/pdf-signature';
import { compareWithRedraw } from '../../app/documents/verify-render';
import { standardsUsed } from '../../app/documents/model';
import { readPdf } from '../../app/documents/pdfread';
import { decodeRecord, documentDataOf, type EmbeddedRecord } from '../../app/documents/record';
import { demoLab, HAS_POPPLER, pdfText, renderPages, run, writeTemp, type DemoLab } from './fixture';

let demo: DemoLab;
let cert: IssuedDocumentFile;
let certFile: string;
let certText: string;
let sheet: IssuedDocumentFile;
let sheetFile: string;

beforeAll(async () => {
  demo = await demoLab();
  cert = await demo.lab.api.issueCertificate({ checkId: demo.adjustedCheckId });
  certFile = writeTemp(demo.dir, 'certificate.pdf', Buffer.from(cert.pdfBase64, 'base64'));
  certText = HAS_POPPLER ? pdfText(certFile) : '';
  sheet = await demo.lab.api.issueSheet({ checkId: demo.adjustedCheckId });
  sheetFile = writeTemp(demo.dir, 'sheet.pdf', Buffer.from(sheet.pdfBase64, 'base64'));
});
afterAll(() => demo.lab.close());

async function refusal(p: Promise<unknown>): Promise<LabError> {
  try {
    await p;
  } catch (e) {
    if (e instanceof LabError) return e;
    throw e;
  }
  throw new Error('expected a refusal');
}

describe.skipIf(!HAS_POPPLER)('certificate content: ISO/IEC 17025:2017 checklist in the text', () => {
  const has = (re: RegExp) => expect(certText).toMatch(re);

  it('7.8.2.1 a: a title', () => has(/Certificate of Calibration/));
  it('7.8.2.1 b: name and address of the laboratory', () => {
    has(/Kestrel Row Microwave Laboratory/);
    has(/Unit 3, Kestrel Row, Wrenmouth Trading Estate, Wrenmouth/);
  });
  it('7.8.2.1 c: location of the work', () =>
    has(/Location of the work at the laboratory's permanent premises/));
  it('7.8.2.1 d: unique identification on every page, page x of y, and a clear end', () => {
    const pages = Number(/Pages:\s+(\d+)/.exec(run('pdfinfo', [certFile]).out)?.[1]);
    expect(pages).toBeGreaterThanOrEqual(2);
    for (let i = 1; i <= pages; i++) {
      const page = run('pdftotext', ['-f', String(i), '-l', String(i), certFile, '-']).out.replace(
        /\s+/g,
        ' ',
      );
      expect(page).toContain(`Certificate ${cert.number} revision 1`);
      expect(page).toContain(`page ${i} of ${pages}`);
    }
    has(new RegExp(`End of certificate ${cert.number} revision 1`));
  });
  it('7.8.2.1 e: the customer', () =>
    has(/Customer Kestrel Row Microwave Laboratory \(in-house reference equipment/));
  it('7.8.2.1 f: the method', () => {
    has(/Tune-to-dip/);
    has(/JCGM 100:2008/);
  });
  it('7.8.2.1 g: description, identification and condition of the item', () => {
    has(/WG-201: Waveguide absorption wavemeter/);
    has(/Condition on receipt/);
  });
  it('7.8.2.1 h, i, j: dates of receipt, calibration and issue', () => {
    has(/Date of calibration 2019-04-03/);
    has(/Date of receipt not applicable/);
    has(/Date of issue 2026-12-01/);
  });
  it('7.8.2.1 k: sampling (stated as not applicable)', () => has(/Sampling not applicable/));
  it('7.8.2.1 l: results relate only to the item', () =>
    has(/The results relate only to the item calibrated/));
  it('7.8.2.1 m: results with units', () => {
    has(/Reference frequency \/ GHz/);
    has(/Error \/ kHz/);
    has(/Error \/ ppm/);
    has(/10\.00000 10\.00685/);
  });
  it('7.8.2.1 n: additions, deviations, exclusions', () => has(/Additions, deviations, exclusions/));
  it('7.8.2.1 o: the persons authorizing, with the meaning of each signature', () => {
    has(/Ravi Ostrander technician performed the check/);
    has(/Maren Holt-Ibsen reviewer reviewed the record/);
  });
  it('7.8.2.1 p: results from external providers identified', () => {
    has(/Issued by \(external provider\)/);
    has(/every measurement on this certificate was made by this laboratory/);
  });
  it('7.8.4.1 a: measurement uncertainty with its coverage factor', () => {
    has(/U ?\/ ?ppm/);
    has(/coverage factor k/);
  });
  it('7.8.4.1 b: conditions of the calibration', () => {
    has(/Air temperature \d+\.\d °C \(standard uncertainty/);
    has(/Air pressure \d+\.\d hPa/);
    has(/Relative humidity \d+ %RH/);
  });
  it('7.8.4.1 c: metrological traceability statement', () => {
    has(/metrologically traceable to the SI unit of frequency/);
    has(/STD-01/);
  });
  it('7.8.4.1 d: results before and after adjustment', () => {
    has(/Results as found \(before adjustment\)/);
    has(/Results as left \(after adjustment\)/);
  });
  it('7.8.4.1 e and 7.8.6.2 a, b, c: statement of conformity, what it applies to, the specification, the decision rule', () => {
    has(/Statement of conformity/);
    has(/Applies to: the 7 as-left points/);
    has(/Specification: the stated accuracy of WG-201, ±1000 ppm of reading/);
    has(/Decision rule: binary acceptance with guard band w = 1 U \(ILAC-G8:09\/2019 clause 4\.2\.2\)/);
    has(/the meter CONFORMS to its stated accuracy/);
  });
  it('the chart has axis titles with units and a legend', () => {
    has(/Frequency \/ GHz/);
    has(/Error \/ ppm of reading/);
    has(/tolerance \(stated accuracy\)/);
  });
  it('7.8.4.3: no interval recommendation unless the lab has agreed to print one', () => {
    expect(certText).not.toMatch(/Suggested calibration interval/);
    expect(cert.intervalPrinted).toBe(false);
  });
});

describe.skipIf(!HAS_POPPLER)('archival form', () => {
  it('is PDF/A-3b with every font embedded and the record attached as its source', () => {
    const fonts = run('pdffonts', [certFile]).out.split('\n').slice(2).filter(Boolean);
    expect(fonts.length).toBeGreaterThanOrEqual(3);
    for (const line of fonts) expect(line).toMatch(/DejaVu\S*\s+CID TrueType\s+Identity-H\s+yes yes yes/);
    const raw = readFileSync(certFile).toString('latin1');
    expect(raw).toContain('<pdfaid:part>3</pdfaid:part>');
    expect(raw).toContain('<pdfaid:conformance>B</pdfaid:conformance>');
    expect(raw).toMatch(/\/OutputIntents/);
    expect(run('pdfinfo', [certFile]).out).toMatch(/PDF version:\s+1\.7/);
    expect(run('pdfdetach', ['-list', certFile]).out).toContain(cert.recordName);
    const contents = readPdf(readFileSync(certFile));
    const file = contents.files.find((f) => f.name === cert.recordName);
    expect(file?.relationship).toBe('Source');
  });

  it('carries the exchange document and the computed results, readable by "dipledger record"', () => {
    const file = readPdf(readFileSync(certFile)).files[0];
    expect(file).toBeDefined();
    if (!file) return;
    const rec = decodeRecord(file.bytes) as EmbeddedRecord;
    expect(rec.format).toBe('dipledger.check/1');
    expect(rec.meter).toBe('WG-201');
    expect(rec.adjusted).toBe(true);
    expect(rec.record.checkId).toBe(demo.adjustedCheckId);
    expect(rec.record.points[0]?.result.budget.contributions.length).toBeGreaterThan(5);
    expect(rec.signatures.map((s) => s.meaning)).toEqual(['performed', 'reviewed']);
    expect(rec.document).toMatchObject({ number: cert.number, revision: 1, kind: 'certificate' });
  });

  it('re-renders byte for byte from the record it carries (same inputs, same bytes)', async () => {
    const file = readPdf(readFileSync(certFile)).files[0];
    if (!file) throw new Error('no record attached');
    const rec = decodeRecord(file.bytes) as EmbeddedRecord;
    const data = {
      lab: await demo.lab.api.getLab(),
      meter: (await demo.lab.api.getMeter('WG-201')).meter,
      check: rec.record,
      standards: standardsUsed(rec.record, await demo.lab.api.listStandards()),
      signatures: rec.signatures,
      signedContent: rec.signedContent,
      issue: rec.document,
      suggestedInterval: null,
    };
    // The record carries the rest of what the pages were drawn from: the same as the lab's.
    const carried = documentDataOf(rec);
    expect(carried).not.toBeNull();
    const again = renderCertificate(data);
    expect(renderCertificate(carried ?? data).pdf.equals(again.pdf)).toBe(true);
    // The issued file is that rendering signed: the same outside the signature's byte range.
    const issued = Buffer.from(cert.pdfBase64, 'base64');
    const redraw = compareWithRedraw(issued, rec, checkPdfSignature(issued).byteRange);
    expect(redraw.ok).toBe(true);
    expect(redraw.detail).toMatch(/same byte for byte outside the signature value/);
  });
});

describe.skipIf(!HAS_POPPLER)('pages to look at (test-output/documents)', () => {
  it('renders the certificate, check-sheet and worksheet to PNG', async () => {
    const ws = await demo.lab.api.worksheet('WG-201');
    const wsFile = writeTemp(demo.dir, 'worksheet.pdf', Buffer.from(ws.pdfBase64, 'base64'));
    const micro = await demo.lab.api.worksheet('CW-102');
    const microFile = writeTemp(demo.dir, 'worksheet-cw102.pdf', Buffer.from(micro.pdfBase64, 'base64'));
    for (const [file, name] of [
      [certFile, 'certificate'],
      [sheetFile, 'check-sheet'],
      [wsFile, 'worksheet'],
      [microFile, 'worksheet-cw102'],
    ] as const) {
      const pages = renderPages(file, name);
      expect(pages.length).toBeGreaterThan(0);
      for (const p of pages) expect(existsSync(p) && statSync(p).size > 5000).toBe(true);
    }
  });
});

describe.skipIf(!HAS_POPPLER)('check-sheet and worksheet content', () => {
  it('check-sheet: every reading, corrections, budget per point, U, k, verdict, signatures with meanings', async () => {
    const check = await demo.lab.api.getCheck(demo.adjustedCheckId);
    expect(sheet.number).toMatch(/^S-2026-\d{4}$/);
    const text = pdfText(sheetFile);
    expect(text).toContain('Check-sheet');
    for (const p of check.points) {
      expect(text).toContain(`Point ${p.seq}: `);
      for (const r of p.readings) expect(text).toContain((r.value / 1e9).toFixed(5));
    }
    expect(text).toMatch(/thermal [+-]\d+\.\d{2} ppm; air [+-]\d+\.\d{2} ppm/);
    expect(text).toMatch(/Reference source \(certificate\)/);
    expect(text).toMatch(/u_c = .* ν_eff = .* k = \d\.\d{2} .* U = /);
    expect(text).toMatch(/probability of conformity (> 99\.9 %|< 0\.1 %|\d+\.\d %) \(JCGM 106:2012\)/);
    expect(text).toContain('performed the check');
    expect(text).toContain('reviewed the record');
    expect(text).toMatch(/End of check-sheet S-2026-\d{4} revision 1/);
  });

  it('worksheet: the plan across the band, both directions, conditions and sources, and the cautions', async () => {
    const ws = await demo.lab.api.worksheet('WG-201');
    const text = pdfText(writeTemp(demo.dir, 'ws.pdf', Buffer.from(ws.pdfBase64, 'base64')));
    const meter = (await demo.lab.api.getMeter('WG-201')).meter;
    for (const f of meter.planHz) expect(text).toContain((f / 1e9).toFixed(5));
    expect(text).toContain('↑ up 1');
    expect(text).toContain('↓ down 2');
    expect(text).toContain('Temperature / °C');
    expect(text).toContain('Sources used');
    expect(text).toContain(`Maximum input power of this meter: ${meter.maxInputPowerW} W`);
    expect(text).toContain('RF exposure');
    expect(text).toMatch(/support, and never replace, the lab's quality system/);
  });

  it('worksheet of a micrometer meter gives the chart setting of each point', async () => {
    const ws = await demo.lab.api.worksheet('CW-102');
    const text = pdfText(writeTemp(demo.dir, 'ws2.pdf', Buffer.from(ws.pdfBase64, 'base64')));
    const meter = (await demo.lab.api.getMeter('CW-102')).meter;
    expect(text).toContain(meter.dialKind === 'divisions' ? 'Chart / div' : 'write the dial reading in GHz');
  });
});

describe('numbering, replacement and refusals', () => {
  it('refuses a draft check and writes nothing', async () => {
    const before = await demo.lab.api.listDocuments();
    const e = await refusal(demo.lab.api.issueCertificate({ checkId: demo.draftCheckId }));
    expect(e.code).toBe('refused');
    expect(e.message).toMatch(/no signed revision: sign it first/);
    expect(await demo.lab.api.listDocuments()).toEqual(before);
  });

  it('refuses bad input naming the field', async () => {
    const e = await refusal(demo.lab.api.issueCertificate({ checkId: 'seven' as never }));
    expect(e.issues[0]?.field).toBe('checkId');
    const f = await refusal(demo.lab.api.issueCertificate({ checkId: 999999 }));
    expect(f.message).toMatch(/no check 999999/);
  });

  it('a second certificate of the same check needs a reason and replaces the first (7.8.8)', async () => {
    const e = await refusal(demo.lab.api.issueCertificate({ checkId: demo.adjustedCheckId }));
    expect(e.code).toBe('conflict');
    expect(e.issues[0]?.field).toBe('replaceReason');
    const second = await demo.lab.api.issueCertificate({
      checkId: demo.adjustedCheckId,
      replaceReason: 'the laboratory address was corrected',
    });
    expect(second.number).toBe(cert.number);
    expect(second.revision).toBe(2);
    expect(second.replaces).toEqual({
      number: cert.number,
      revision: 1,
      reason: 'the laboratory address was corrected',
    });
    const first = (await demo.lab.api.listDocuments({ checkId: demo.adjustedCheckId })).find(
      (d) => d.number === cert.number && d.revision === 1,
    );
    expect(first?.replacedBy).toEqual({ number: cert.number, revision: 2 });
    if (HAS_POPPLER) {
      const text = pdfText(writeTemp(demo.dir, 'second.pdf', Buffer.from(second.pdfBase64, 'base64')));
      expect(text).toMatch(
        new RegExp(
          `replaces certificate ${cert.number} revision 1, issued .*Reason for the change: the laboratory address was corrected`,
        ),
      );
    }
    // The replaced document now verifies as authentic but no longer current.
    const v = await demo.lab.api.verifyDocument({ pdfBase64: cert.pdfBase64 });
    expect(v.ok).toBe(false);
    expect(v.findings.find((f) => f.check === 'current')?.detail).toMatch(
      /has been replaced by .* revision 2/,
    );
  });

  it('numbers run per kind and year', async () => {
    const docs = await demo.lab.api.listDocuments();
    const certs = docs.filter((d) => d.kind === 'certificate' && d.revision === 1).map((d) => d.number);
    expect(new Set(certs).size).toBe(certs.length);
    for (const n of certs) expect(n).toMatch(/^C-2026-\d{4}$/);
  });
});

describe.skipIf(!HAS_POPPLER)('suggested interval (7.8.4.3)', () => {
  it('appears only when the lab prints suggested intervals', async () => {
    const settings = await demo.lab.api.getLab();
    await demo.lab.api.updateLab({ ...settings, printSuggestedInterval: true });
    try {
      const d = await demo.lab.api.issueCertificate({ checkId: demo.newestCheckId });
      const text = pdfText(writeTemp(demo.dir, 'interval.pdf', Buffer.from(d.pdfBase64, 'base64')));
      expect(d.intervalPrinted).toBe(true);
      expect(text).toMatch(/Suggested calibration interval/);
      expect(text).toMatch(/\d+ months, by /);
    } finally {
      await demo.lab.api.updateLab({ ...settings });
    }
  });
});
