// @vitest-environment happy-dom
// The views that end a check, in happy-dom against a fake LabApi: people and their signing keys in
// the settings, a check's page (sign with name and passphrase, then issue its documents), and the
// sweep method in the record form (a trace attached per point, fitted, its dip drawn).
import { cleanup, fireEvent, render, screen, waitFor, within } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import type { IssuedDocument, IssuedDocumentFile } from '../../app/api/contract-documents';
import type { CheckRevisionView, Signer } from '../../app/api/contract-records';
import type { TraceFit } from '../../app/api/contract-sweep';
import { LabError } from '../../app/api/errors';
import { CheckPage } from '../../renderer/src/check/CheckPage';
import { MeterPage } from '../../renderer/src/meter/MeterPage';
import { PeopleSection } from '../../renderer/src/settings/PeopleSection';
import { RecordCheckPage } from '../../renderer/src/record/RecordCheckPage';
import { emptyForm, fromDocument, toDocument } from '../../renderer/src/record/checkForm';
import { BENCH_CHECKS, fakeBench } from '../e2e/fixtures/fakeBench';
import { LabProvider } from '../../renderer/src/lab/LabContext';

afterEach(cleanup);
const type = (el: HTMLElement, value: string) => fireEvent.change(el, { target: { value } });

describe('people and signing keys in the settings', () => {
  it('lists who can sign, and gives a key only for a long enough passphrase typed twice alike', async () => {
    const bench = fakeBench();
    render(
      <LabProvider api={bench.api}>
        <PeopleSection />
      </LabProvider>,
    );
    const table = await screen.findByTestId('people');
    expect(within(table).getByText('Tess Quarry').closest('tr')?.textContent).toContain('none: cannot sign');
    const form = screen.getByRole('form', { name: 'Give a signing key' });
    const make = within(form).getByRole<HTMLButtonElement>('button', { name: 'Make the signing key' });
    fireEvent.change(within(form).getByLabelText('Person'), { target: { value: 'Tess Quarry' } });
    type(within(form).getByLabelText(/^Passphrase \(at least 10/), 'short');
    type(within(form).getByLabelText('Passphrase again'), 'short');
    // The button stays pressable (focus is never dropped); pressing it says what is wrong.
    fireEvent.click(make);
    const refusal = await within(form).findByRole('alert');
    expect(refusal.textContent).toContain('the passphrase needs at least 10 characters');
    const pass = within(form).getByLabelText(/^Passphrase \(at least 10/);
    await waitFor(() => expect(document.activeElement).toBe(pass));
    expect(pass.getAttribute('aria-invalid')).toBe('true');
    expect(pass.getAttribute('aria-describedby')).toBe(refusal.id);
    expect(bench.calls.some((c) => c.op === 'enrolSigner')).toBe(false);
    type(within(form).getByLabelText(/^Passphrase \(at least 10/), 'tess-long-passphrase');
    type(within(form).getByLabelText('Passphrase again'), 'tess-long-passphrasE');
    expect(within(form).getByText(/the two passphrases differ/)).toBeTruthy();
    fireEvent.click(make);
    expect(bench.calls.some((c) => c.op === 'enrolSigner')).toBe(false);
    type(within(form).getByLabelText('Passphrase again'), 'tess-long-passphrase');
    expect(make.getAttribute('aria-disabled')).toBe('false');
    fireEvent.click(make);
    expect(await screen.findByText(/Tess Quarry can sign/)).toBeTruthy();
    expect(bench.calls.filter((c) => c.op === 'enrolSigner')).toEqual([
      { op: 'enrolSigner', args: [{ name: 'Tess Quarry', passphrase: '(hidden)' }] },
    ]);
    await waitFor(() =>
      expect(
        within(screen.getByTestId('people')).getByText('Tess Quarry').closest('tr')?.textContent,
      ).toMatch(/enrolled 2026-12-01/),
    );
    // Nothing of the passphrase stays on screen.
    expect(document.body.innerHTML).not.toContain('tess-long-passphrase');
  });

  it('adds a person with a role', async () => {
    const bench = fakeBench();
    render(
      <LabProvider api={bench.api}>
        <PeopleSection />
      </LabProvider>,
    );
    const form = await screen.findByRole('form', { name: 'Add a person' });
    type(within(form).getByLabelText('Full name'), 'Ines Varga');
    fireEvent.change(within(form).getByLabelText('Role'), { target: { value: 'reviewer' } });
    fireEvent.click(within(form).getByRole('button', { name: 'Add the person' }));
    expect(await screen.findByText('✓ Ines Varga added as reviewer.')).toBeTruthy();
    expect(await within(screen.getByTestId('people')).findByText('Ines Varga')).toBeTruthy();
  });
});

/** A check that waits for its performer's signature, and a lab where Tess can sign. */
function checkBench() {
  const record = structuredClone(BENCH_CHECKS[0]!);
  const signer: Signer = {
    person: { id: 1, name: 'Tess Quarry', role: 'technician' },
    keyFingerprint: 'cd'.repeat(32),
    enrolledAt: '2026-11-01T09:00:00.000Z',
  };
  const view: CheckRevisionView = {
    record: { ...record, state: 'draft' },
    effectiveRevision: null,
    revisions: [
      {
        revision: record.revision,
        state: 'draft',
        recordedAt: record.recordedAt,
        amendReason: null,
        amendedBy: null,
        signatures: 0,
      },
    ],
    amendment: null,
    signatures: [],
    awaiting: 'performed',
    standardsUsed: [],
    traceabilityExceptions: [],
    changes: [],
  };
  const documents: IssuedDocument[] = [];
  const signed: unknown[] = [];
  const issued: unknown[] = [];
  const { api } = fakeBench({
    getCheckRevision: () => Promise.resolve(structuredClone(view)),
    listSigners: () => Promise.resolve([signer]),
    listDocuments: () => Promise.resolve(structuredClone(documents)),
    signCheck: (input) => {
      signed.push({ ...input, passphrase: input.passphrase === 'tess-long-passphrase' ? 'right' : 'wrong' });
      if (input.passphrase !== 'tess-long-passphrase')
        return Promise.reject(
          new LabError(
            'refused',
            'the passphrase does not open Tess Quarry’s signing key: nothing was signed',
          ),
        );
      view.record.state = 'signed';
      view.effectiveRevision = view.record.revision;
      view.awaiting = 'reviewed';
      view.signatures.push({
        seq: 1,
        printedName: 'Tess Quarry',
        role: 'technician',
        meaning: 'performed',
        signedAt: '2026-12-01T09:30:00.000Z',
        keyFingerprint: signer.keyFingerprint,
        payloadSha256: 'ef'.repeat(32),
      });
      return Promise.resolve(structuredClone(view));
    },
    issueCertificate: (input) => {
      issued.push(input);
      const doc: IssuedDocumentFile = {
        kind: 'certificate',
        number: 'C-2026-0007',
        revision: 1,
        meterAssetId: view.record.meterAssetId,
        checkId: view.record.checkId,
        checkRevision: view.record.revision,
        issuedAt: '2026-12-01T09:40:00.000Z',
        issuedBy: 'local user',
        sha256: '12'.repeat(32),
        recordSha256: '34'.repeat(32),
        recordName: 'record.json',
        byteLength: 4,
        pdfSigned: false,
        intervalPrinted: false,
        signatures: 1,
        replaces: null,
        replacedBy: null,
        pdfBase64: btoa('%PDF'),
      };
      documents.push(doc);
      return Promise.resolve(doc);
    },
  });
  return { api, view, signed, issued };
}

describe("a check's page", () => {
  it('signs with name and passphrase, refusing a wrong one, then issues the certificate', async () => {
    const b = checkBench();
    render(
      <LabProvider api={b.api}>
        <CheckPage checkId={b.view.record.checkId} />
      </LabProvider>,
    );
    const form = await screen.findByRole('form', { name: 'Sign this check' });
    expect(screen.getByTestId('check-state').textContent).toContain('not signed yet');
    expect(
      screen.getByText(/A check-sheet and a certificate can be issued once the check is signed/),
    ).toBeTruthy();
    fireEvent.change(within(form).getByLabelText('Signer'), { target: { value: 'Tess Quarry' } });
    const pass = within(form).getByLabelText<HTMLInputElement>('Passphrase');
    type(pass, 'not-the-passphrase');
    fireEvent.click(within(form).getByRole('button', { name: 'Sign as performed' }));
    expect((await screen.findByRole('alert')).textContent).toContain('nothing was signed');
    expect(pass.value).toBe('');
    type(pass, 'tess-long-passphrase');
    fireEvent.click(within(form).getByRole('button', { name: 'Sign as performed' }));
    const list = await screen.findByTestId('signatures');
    expect(list.textContent).toContain('performed by Tess Quarry (technician)');
    expect(b.signed).toEqual([
      { checkId: b.view.record.checkId, person: 'Tess Quarry', passphrase: 'wrong', meaning: 'performed' },
      { checkId: b.view.record.checkId, person: 'Tess Quarry', passphrase: 'right', meaning: 'performed' },
    ]);
    // Signed: the documents can be issued, and the next signature asked for is the review.
    expect(await screen.findByRole('button', { name: 'Sign as reviewed' })).toBeTruthy();
    fireEvent.click(screen.getByRole('button', { name: 'Issue the certificate' }));
    const done = await screen.findByTestId('issued');
    expect(done.textContent).toContain('Issued certificate C-2026-0007');
    expect(
      (await within(done).findByRole('link', { name: 'Save C-2026-0007.pdf' })).getAttribute('download'),
    ).toBe('C-2026-0007.pdf');
    expect(b.issued).toEqual([{ checkId: b.view.record.checkId }]);
    // Issued once: a second one is a replacement and says so.
    expect(await screen.findByRole('button', { name: 'Issue a replacement certificate' })).toBeTruthy();
  });
});

const TRACE = ['! invented trace', '# GHz S DB R 50']
  .concat(
    Array.from({ length: 201 }, (_, i) => {
      const f = 9.99 + (0.02 * i) / 200;
      const u = (2 * 1500 * (f - 10)) / 10;
      const p = 1 - 0.4 / (1 + u * u);
      return `${f.toFixed(6)} ${(10 * Math.log10(p)).toFixed(5)} 0`;
    }),
  )
  .join('\n');

describe('the sweep method in the record form', () => {
  it('attaches a trace to a point, fits it and draws the fitted dip', async () => {
    const fits: unknown[] = [];
    const judged: Record<string, unknown>[] = [];
    const bench = fakeBench({
      evaluateBudget: (doc) => {
        judged.push(doc);
        return Promise.resolve(structuredClone(BENCH_CHECKS[0]!.points[0]!.result));
      },
      fitTrace: (input) => {
        fits.push(input);
        const fit: TraceFit = {
          description: 'Touchstone 1.1, S21 in dB, 201 points',
          pointCount: 201,
          warnings: [],
          report: {
            main: {
              method: 'scalar-lorentzian',
              f0Hz: 10.0000123e9,
              f0UncertaintyHz: 850,
              loadedQ: 1498.6,
              loadedQUncertainty: 3,
              depthDb: 2.22,
              depthFraction: 0.4,
              baselineAtF0: 1,
              baselineSlopePerHz: 0,
              residualRms: 0.001,
              halfDepthBandwidthHz: 6.67e6,
              twoToneResolutionHz: 3.85e6,
              unloadedQ: null,
              externalQ: null,
              qCircleDiameter: null,
              pointsPerLinewidth: 67,
              pointsUsed: 201,
              iterations: 5,
            },
            spurious: [],
            notes: [],
          },
          plot: {
            frequencyHz: [9.99e9, 10e9, 10.01e9],
            measuredDb: [-0.1, -2.2, -0.1],
            fittedDb: [-0.1, -2.22, -0.1],
          },
        };
        return Promise.resolve(fit);
      },
    });
    render(
      <LabProvider api={bench.api}>
        <RecordCheckPage assetId="WM-003" />
      </LabProvider>,
    );
    await screen.findByTestId('meter-brief');
    type(screen.getByLabelText('Temperature / °C'), '21.5');
    type(screen.getByLabelText('Pressure / hPa'), '1009');
    type(screen.getByLabelText('Relative humidity / %RH'), '44');
    fireEvent.click(screen.getByRole('checkbox', { name: /SRC-1/ }));
    fireEvent.click(screen.getByRole('radio', { name: /Swept/ }));
    const points = await screen.findByTestId('swept-points');
    const first = within(points).getAllByRole('listitem')[0]!;
    expect(within(first).getByLabelText<HTMLInputElement>(/dial set to \/ GHz/).value).toBe('8.5');
    const file = new File([TRACE], 'dip-8g5.s2p', { type: 'text/plain' });
    fireEvent.change(within(first).getByLabelText(/swept trace/), { target: { files: [file] } });
    const result = await within(first).findByTestId('swept-result');
    expect(result.textContent).toContain(
      'dip-8g5.s2p: resonance at 10.000012 GHz, loaded Q 1499, dip 2.22 dB',
    );
    expect(
      within(first).getByRole('figure', { name: 'Swept trace dip-8g5.s2p with the fitted dip' }),
    ).toBeTruthy();
    expect(fits).toEqual([{ text: TRACE, name: 'dip-8g5.s2p' }]);
    expect(screen.getByTestId('review').textContent).toContain('1 of 3 points have a trace attached');
    // Judged live as recording will judge it: the dial setting and the trace go to the budget.
    const verdict = await within(first).findByTestId('swept-verdict');
    expect(verdict.textContent).toMatch(
      /^Error [+−]\d+\.\d ppm after corrections, U = \d+\.\d ppm \(k = \d\.\d\d\): /,
    );
    expect(judged.at(-1)).toMatchObject({
      format: 'dipledger.budget/1',
      meter: 'WM-003',
      standard: 'SRC-1',
      dialSetting: '8.5 GHz',
      sweep: { name: 'dip-8g5.s2p', text: TRACE },
    });
    expect(judged.at(-1)).not.toHaveProperty('readings');
  });

  it('writes swept points as dial setting and trace, and reads them back from a draft', () => {
    const form = {
      ...emptyForm('2026-12-01'),
      meter: 'WM-003',
      method: 'sweep' as const,
      points: [
        {
          phase: 'as-found' as const,
          reference: '10 GHz',
          standard: '',
          up: ['', ''],
          down: ['', ''],
          dipDepthDb: '',
          dialSetting: '10.0002',
          sweep: { name: 'a.s2p', text: TRACE },
        },
      ],
    };
    const doc = toDocument(form, 'GHz', 'record');
    expect(doc.points).toEqual([
      { phase: 'as-found', dialSetting: '10.0002 GHz', sweep: { name: 'a.s2p', text: TRACE } },
    ]);
    const draft = toDocument(form, 'GHz', 'draft');
    const back = fromDocument(draft, 'GHz', '2026-12-01');
    expect(back.method).toBe('sweep');
    expect(back.points[0]).toMatchObject({
      reference: '10 GHz',
      dialSetting: '10.0002',
      sweep: { name: 'a.s2p' },
    });
  });
});

describe("the bench worksheet from a meter's page", () => {
  it('asks for the worksheet and offers the PDF to save', async () => {
    const asked: string[] = [];
    const { api } = fakeBench({
      worksheet: (assetId) => {
        asked.push(assetId);
        return Promise.resolve({ assetId, printedOn: '2026-12-01', pdfBase64: btoa('%PDF-1.7') });
      },
    });
    render(
      <LabProvider api={api}>
        <MeterPage assetId="WM-003" />
      </LabProvider>,
    );
    fireEvent.click(await screen.findByRole('button', { name: 'Print the bench worksheet' }));
    const ready = await screen.findByTestId('worksheet-ready');
    expect(within(ready).getByRole('link', { name: 'Save worksheet-WM-003-2026-12-01.pdf' })).toBeTruthy();
    expect(asked).toEqual(['WM-003']);
  });
});

describe("a check's page, re-issuing a check-sheet", () => {
  it('sends the reason for the replacement (the stored kind is "check-sheet")', async () => {
    const b = checkBench();
    b.view.record.state = 'signed';
    b.view.effectiveRevision = b.view.record.revision;
    const sheets: unknown[] = [];
    const existing: IssuedDocument = {
      kind: 'check-sheet',
      number: 'S-2026-0003',
      revision: 1,
      meterAssetId: b.view.record.meterAssetId,
      checkId: b.view.record.checkId,
      checkRevision: b.view.record.revision,
      issuedAt: '2026-12-01T09:35:00.000Z',
      issuedBy: 'local user',
      sha256: '56'.repeat(32),
      recordSha256: '78'.repeat(32),
      recordName: 'record.json',
      byteLength: 4,
      pdfSigned: false,
      intervalPrinted: false,
      signatures: 1,
      replaces: null,
      replacedBy: null,
    };
    const api = {
      ...b.api,
      listDocuments: () => Promise.resolve([structuredClone(existing)]),
      issueSheet: (input: Parameters<typeof b.api.issueSheet>[0]) => {
        sheets.push(input);
        return Promise.reject(new LabError('refused', 'stop here'));
      },
    };
    render(
      <LabProvider api={api}>
        <CheckPage checkId={b.view.record.checkId} />
      </LabProvider>,
    );
    const button = await screen.findByRole('button', { name: 'Issue a replacement check-sheet' });
    type(screen.getByLabelText('Why a replacement (needed to issue a document again)'), 'smudged print');
    fireEvent.click(button);
    await screen.findByRole('alert');
    expect(sheets).toEqual([{ checkId: b.view.record.checkId, replaceReason: 'smudged print' }]);
  });
});
