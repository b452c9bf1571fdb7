// @vitest-environment happy-dom
// Long work with progress and a way to stop: a history CSV cut into pieces of whole checks (rows of
// one meter and date stay together, refusals are told with the file's own line numbers), an import
// stopped between pieces, a batch of certificates, and the lab file check.
import { cleanup, fireEvent, render, screen, waitFor, within } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import type { ImportResult } from '../../app/api/contract';
import { LabError } from '../../app/api/errors';
import { ImportHistory, IntegrityCheck, IssueCertificates } from '../../renderer/src/settings/LongWork';
import { inFileLines, planCsv } from '../../renderer/src/settings/csvChunks';
import { fakeBench } from '../e2e/fixtures/fakeBench';
import { LabProvider } from '../../renderer/src/lab/LabContext';

afterEach(cleanup);

const HEADER = 'meter,date,performer,reading,remarks';
/** Six checks; the rows of WM-1 on 2026-01-05 are split by another check's row, one remark quoted. */
const CSV = [
  HEADER,
  'WM-1,2026-01-05,Tess,8.5,',
  'WM-2,2026-01-05,Tess,9.1,',
  'WM-1,2026-01-05,Tess,8.6,"two lines\nof remark"',
  'WM-1,2026-02-05,Tess,8.5,',
  'WM-3,2026-02-05,Tess,8.5,',
  'WM-4,2026-02-05,Tess,8.5,',
  'WM-5,2026-02-05,Tess,8.5,',
].join('\r\n');

describe('a history CSV in pieces', () => {
  it('keeps the rows of one check together and counts checks and rows', () => {
    const plan = planCsv(CSV, 4);
    expect(plan.checks).toBe(6);
    expect(plan.rows).toBe(7);
    expect(plan.chunks.map((c) => c.checks)).toEqual([4, 2]);
    const first = plan.chunks[0]!;
    expect(first.text.split('\r\n')[0]).toBe(HEADER);
    // WM-1's two rows of 2026-01-05 come first, together, the quoted newline intact.
    expect(first.text).toContain(
      'WM-1,2026-01-05,Tess,8.5,\r\nWM-1,2026-01-05,Tess,8.6,"two lines\nof remark"\r\n',
    );
    // Lines of the file for each line of the piece: header 1, then 2, the moved row with its
    // two-line remark (4 and 5), then 3, 6 and 7.
    expect(first.fileLine).toEqual([1, 2, 4, 5, 3, 6, 7]);
    // The piece reads back to the same rows.
    expect(planCsv(first.text, 10).rows).toBe(5);
  });

  it("tells a refusal with the file's line numbers", () => {
    const chunk = planCsv(CSV, 4).chunks[1]!;
    expect(chunk.fileLine).toEqual([1, 8, 9]);
    expect(inFileLines('lines 2-3: reading: not a frequency', chunk)).toBe(
      'lines 8-9: reading: not a frequency',
    );
    expect(inFileLines('line 3: meter: unknown', chunk)).toBe('line 9: meter: unknown');
  });

  it('refuses a file without the columns that make a check', () => {
    expect(() => planCsv('a,b\n1,2\n')).toThrow(/no "meter" column/);
    expect(() => planCsv('')).toThrow(/empty/);
  });
});

describe('importing with progress', () => {
  it('imports piece by piece, shows how far it is, and stops between pieces keeping whole checks', async () => {
    const pending: ((r: ImportResult) => void)[] = [];
    const sent: string[] = [];
    const { api } = fakeBench({
      importCsv: (text) => {
        sent.push(text);
        return new Promise((resolve) => pending.push(resolve));
      },
    });
    render(
      <LabProvider api={api}>
        <ImportHistory checksPerChunk={2} />
      </LabProvider>,
    );
    const input = screen.getByLabelText('History file (.csv)');
    fireEvent.change(input, { target: { files: [new File([CSV], 'history.csv', { type: 'text/csv' })] } });
    const progress = await screen.findByTestId('progress');
    expect(progress.textContent).toContain('0 of 6 checks');
    pending.shift()?.({ metersSeen: 2, checksImported: 2, pointsImported: 3 });
    await waitFor(() => expect(screen.getByTestId('progress').textContent).toContain('2 of 6 checks'));
    fireEvent.click(screen.getByRole('button', { name: 'Stop the import' }));
    expect(screen.getByTestId('progress').textContent).toContain('stopping after this piece');
    // The piece under way finishes; nothing more is sent.
    pending.shift()?.({ metersSeen: 2, checksImported: 2, pointsImported: 2 });
    const done = await screen.findByTestId('progress-result');
    expect(done.textContent).toContain('Stopped: 4 of 6 checks of history.csv were imported, whole');
    expect(sent).toHaveLength(2);
  });

  it('names the refused line of the file and what was imported before it', async () => {
    let calls = 0;
    const { api } = fakeBench({
      importCsv: () =>
        ++calls === 1
          ? Promise.resolve({ metersSeen: 2, checksImported: 4, pointsImported: 5 })
          : Promise.reject(new LabError('invalid-input', 'lines 2-2: reading: "x" is not a frequency')),
    });
    render(
      <LabProvider api={api}>
        <ImportHistory checksPerChunk={4} />
      </LabProvider>,
    );
    fireEvent.change(screen.getByLabelText('History file (.csv)'), {
      target: { files: [new File([CSV], 'history.csv')] },
    });
    const failed = await screen.findByRole('alert');
    expect(failed.textContent).toContain('lines 8-8: reading: "x" is not a frequency');
    expect(failed.textContent).toContain('4 checks before it were');
  });
});

describe('a batch of certificates', () => {
  it('issues one certificate per signed check without one, and says which', async () => {
    const issued: number[] = [];
    const base = fakeBench();
    const detail = await base.api.getMeter('WM-003');
    // Every check of the fake meter signed, the first already certified.
    detail.checks.forEach((c) => (c.state = 'signed'));
    const certified = detail.checks[0]!.checkId;
    const bench = fakeBench({
      listMeters: () => base.api.listMeters().then((rows) => rows.filter((r) => r.assetId === 'WM-003')),
      getMeter: () => Promise.resolve(structuredClone(detail)),
      listDocuments: () => Promise.resolve([{ kind: 'certificate', checkId: certified } as never]),
      issueCertificate: (input) => {
        issued.push(input.checkId);
        return Promise.resolve({ number: `C-2026-00${input.checkId}` } as never);
      },
    });
    let reloaded = 0;
    render(
      <LabProvider api={bench.api}>
        <IssueCertificates onIssued={() => reloaded++} />
      </LabProvider>,
    );
    fireEvent.click(screen.getByRole('button', { name: 'Issue the missing certificates' }));
    const done = await screen.findByTestId('progress-result');
    const signed = detail.checks.map((c) => c.checkId).filter((id) => id !== certified);
    expect(signed.length).toBeGreaterThan(0);
    expect([...issued].sort()).toEqual([...signed].sort());
    expect(done.textContent).toContain(`${signed.length} certificates issued`);
    expect(reloaded).toBe(1);
  });
});

describe('the lab file check', () => {
  it('shows the report with the audit head to note down', async () => {
    let t = 1000;
    const { api } = fakeBench({
      verifyIntegrity: () =>
        Promise.resolve({
          ok: true,
          sqlite: ['ok'],
          auditEntries: 40,
          auditHead: 'ab'.repeat(32),
          signaturesChecked: 12,
          problems: [],
        }),
    });
    render(
      <LabProvider api={api}>
        <IntegrityCheck now={() => (t += 2500)} />
      </LabProvider>,
    );
    fireEvent.click(screen.getByRole('button', { name: 'Check the lab file' }));
    const result = await screen.findByTestId('integrity-result');
    expect(result.textContent).toContain(
      '✓ Sound: 40 audit entries, 12 signatures checked, SQLite: ok (2.5 s)',
    );
    expect(within(result).getByText(/Newest audit hash abab/)).toBeTruthy();
  });
});
