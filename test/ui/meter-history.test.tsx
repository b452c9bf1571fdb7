// @vitest-environment happy-dom
// The meter page's history sections and the documents view, in happy-dom against the fake bench:
// the drift chart with its prediction band, tolerance and exit date, flags in words and symbols,
// the suggested interval with its method; the dip depth chart with the minimum dip; revisions,
// signatures and the meter's audit trail; listing issued documents and verifying a picked PDF.
// Every number here is invented for these tests.
import { cleanup, fireEvent, render, screen, waitFor, within } from '@testing-library/react';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { TrendReport } from '../../app/api/contract-history';
import type { AuditEntryView, CheckRevisionView } from '../../app/api/contract-records';
import type { IssuedDocument, VerifyReport } from '../../app/api/contract-documents';
import type { SweepSummary } from '../../app/api/contract-sweep';
import { App } from '../../renderer/src/App';
import { DocumentsPage, bytesToBase64 } from '../../renderer/src/documents/DocumentsPage';
import { MeterPage } from '../../renderer/src/meter/MeterPage';
import { revisionWord } from '../../renderer/src/meter/MeterRecords';
import { firstToWatch, formatProbability, roundUp, trendRows } from '../../renderer/src/meter/TrendSection';
import { yearTicks } from '../../renderer/src/charts/timeAxis';
import { BENCH_CHECKS, fakeBench } from '../e2e/fixtures/fakeBench';
import { LabProvider } from '../../renderer/src/lab/LabContext';

afterEach(cleanup);
beforeEach(() => {
  window.location.hash = '';
});

const history = (slope: number, offset: number) =>
  ['2021-01-15', '2022-01-12', '2023-01-20', '2024-01-10', '2025-01-15'].map((date, i) => ({
    date,
    phase: 'as-found' as const,
    errorPpm: offset + slope * i,
    uPpm: 20,
    used: true,
  }));

const band = (start: number, slope: number) =>
  ['2021-01-15', '2023-01-15', '2025-01-15', '2026-01-15', '2027-01-15'].map((date, i) => ({
    date,
    predictedPpm: start + slope * i * 2,
    halfWidthPpm: 40 + i,
  }));

const TREND: TrendReport = {
  assetId: 'WM-003',
  state: 'in-service',
  asOf: '2026-12-01',
  epochDate: '2025-01-15',
  lastCheckDate: '2025-01-15',
  dueDate: '2026-01-15',
  segmentFromDate: '2021-01-15',
  frequencies: [
    {
      frequencyHz: 8.5e9,
      tolerancePpm: 1000,
      history: history(10, 100),
      fit: null,
      atDue: null,
      projectedExitDate: null,
      band: [],
    },
    {
      frequencyHz: 12e9,
      tolerancePpm: 1000,
      history: history(150, 300),
      fit: {
        points: 5,
        dof: 3,
        interceptPpm: 900,
        slopePpmPerYear: 150,
        uInterceptPpm: 10,
        uSlopePpmPerYear: 3,
        residualSdPpm: 8,
        birgeRatio: 0.4,
        fromDate: '2021-01-15',
      },
      atDue: { date: '2026-01-15', predictedPpm: 1050, halfWidthPpm: 44, probabilityOfConformity: 0.12 },
      projectedExitDate: '2025-06-02',
      band: band(300, 150),
    },
  ],
  pooled: { driftPpmPerYear: 80, uDriftPpmPerYear: 4, dof: 6, residualSdPpm: 9, points: 10, frequencies: 2 },
  steps: [],
  health: {
    minDipDb: 1,
    dip: [
      { date: '2021-01-15', minDb: 3.1 },
      { date: '2023-01-20', minDb: 2.4 },
      { date: '2025-01-15', minDb: 1.6 },
    ],
    dipSlopeDbPerYear: -0.38,
    dipFallFraction: 0.48,
    dipReachesMinimumDate: '2026-08-01',
  },
  flags: [
    {
      code: 'drift-exit',
      severity: 'stop',
      date: '2025-06-02',
      message: 'Drift: the band reaches the tolerance on 2025-06-02, before the due date.',
      short: 'drift: exits 2025-06',
    },
    {
      code: 'dip-fading',
      severity: 'warning',
      date: null,
      message: 'The dip grows shallower.',
      short: 'dip fading',
    },
  ],
  projectedExitDate: '2025-06-02',
  suggestion: {
    months: 6,
    currentMonths: 12,
    change: 'shorter',
    method: 'variables',
    methodName: 'variables-data method (drift prediction and probability of conformity)',
    boundedBy: 'minimum',
    rationale: 'The predicted error at 12 months leaves the tolerance; 6 months keeps it inside.',
  },
  printSuggestedInterval: false,
  notes: [],
};

const SWEEPS: SweepSummary[] = [
  {
    checkId: 12,
    revision: 1,
    date: '2025-01-15',
    seq: 1,
    phase: 'as-found',
    dialSetting: 8.5e9,
    f0Hz: 8.5e9,
    f0UncertaintyHz: 1e4,
    loadedQ: 1900,
    depthDb: 1.6,
    spuriousCount: 0,
    spuriousHz: [],
  },
];

function revisionView(checkId: number): CheckRevisionView {
  const record = structuredClone(BENCH_CHECKS.find((c) => c.checkId === checkId)!);
  if (checkId === 7) {
    record.revision = 2;
    return {
      record,
      effectiveRevision: 2,
      revisions: [
        {
          revision: 1,
          state: 'amended',
          recordedAt: '2024-01-10T10:00:00Z',
          amendReason: null,
          amendedBy: null,
          signatures: 1,
        },
        {
          revision: 2,
          state: 'signed',
          recordedAt: '2024-02-01T10:00:00Z',
          amendReason: 'reading at 12 GHz mistyped',
          amendedBy: 'Tess Quarry',
          signatures: 2,
        },
      ],
      amendment: { reason: 'reading at 12 GHz mistyped', by: 'Tess Quarry', at: '2024-02-01T10:00:00Z' },
      signatures: [
        {
          seq: 1,
          printedName: 'Tess Quarry',
          role: 'technician',
          meaning: 'performed',
          signedAt: '2024-02-01T10:05:00Z',
          keyFingerprint: 'ab'.repeat(32),
          payloadSha256: 'cd'.repeat(32),
        },
        {
          seq: 2,
          printedName: 'Omar Vell',
          role: 'reviewer',
          meaning: 'reviewed',
          signedAt: '2024-02-02T09:00:00Z',
          keyFingerprint: 'ef'.repeat(32),
          payloadSha256: 'cd'.repeat(32),
        },
      ],
      awaiting: null,
      standardsUsed: [],
      traceabilityExceptions: [],
      changes: [],
    };
  }
  return {
    record,
    effectiveRevision: null,
    revisions: [
      {
        revision: 1,
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
}

const AUDIT: AuditEntryView[] = [
  {
    id: 3,
    at: '2020-05-01T08:00:00.000Z',
    actor: 'Tess Quarry',
    action: 'create',
    entity: 'meter',
    entityId: 'WM-003',
    before: null,
    after: {},
    hash: '1'.repeat(64),
  },
  {
    id: 40,
    at: '2025-01-15T10:00:00.000Z',
    actor: 'Tess Quarry',
    action: 'record',
    entity: 'check',
    entityId: '12',
    before: null,
    after: {},
    hash: '2'.repeat(64),
  },
  {
    id: 41,
    at: '2025-01-16T10:00:00.000Z',
    actor: 'Omar Vell',
    action: 'record',
    entity: 'check',
    entityId: '99',
    before: null,
    after: {},
    hash: '3'.repeat(64),
  },
  {
    id: 42,
    at: '2025-01-17T10:00:00.000Z',
    actor: 'Omar Vell',
    action: 'change-state',
    entity: 'meter',
    entityId: 'WM-999',
    before: null,
    after: {},
    hash: '4'.repeat(64),
  },
];

const DOCS: IssuedDocument[] = [
  {
    kind: 'certificate',
    number: 'CERT-0001',
    revision: 1,
    meterAssetId: 'WM-003',
    checkId: 7,
    checkRevision: 2,
    issuedAt: '2024-02-03T09:00:00.000Z',
    issuedBy: 'Omar Vell',
    sha256: 'aa'.repeat(32),
    recordSha256: 'bb'.repeat(32),
    recordName: 'check-7-r2.json',
    byteLength: 20480,
    pdfSigned: false,
    intervalPrinted: false,
    signatures: 2,
    replaces: null,
    replacedBy: null,
  },
];

function historyBench(sweeps: SweepSummary[] = SWEEPS) {
  return fakeBench({
    getTrend: (assetId) => Promise.resolve({ ...structuredClone(TREND), assetId }),
    listSweeps: () => Promise.resolve(structuredClone(sweeps)),
    getCheckRevision: (q) => Promise.resolve(revisionView(q.checkId)),
    // As the service answers a meter's query: WM-003 itself, its checks 7 and 12, its certificate.
    listAudit: (q) =>
      Promise.resolve(
        AUDIT.filter((e) =>
          q.meter === 'WM-003'
            ? (e.entity === 'meter' && e.entityId === 'WM-003') ||
              (e.entity === 'check' && ['7', '12'].includes(e.entityId)) ||
              (e.entity === 'document' && e.entityId === 'CERT-0001 revision 1')
            : e.entity === q.entity && e.entityId === q.entityId,
        ).sort((a, b) => b.id - a.id),
      ),
    listDocuments: (q) => Promise.resolve(DOCS.filter((d) => !q?.meter || d.meterAssetId === q.meter)),
  });
}

describe('drift on a meter page', () => {
  it('draws error against time with the band, tolerance and exit date, units on both axes', async () => {
    render(
      <LabProvider api={historyBench().api}>
        <MeterPage assetId="WM-003" />
      </LabProvider>,
    );
    const chart = await screen.findByRole('figure', { name: 'Error against time' });
    const text = chart.textContent ?? '';
    expect(text).toContain('check date / year');
    expect(text).toContain('error / ppm');
    expect(text).toContain('95 % prediction of the next check');
    expect(text).toContain('+1000 ppm tolerance');
    expect(text).toContain('⚠ exit');
    expect(text).toContain('due');
    // Opens on the frequency that leaves the tolerance first, says so in the caption.
    const pressed = within(chart).getByRole('button', { pressed: true });
    expect(pressed.textContent).toBe('12 GHz ⚠');
    const caption = screen.getByTestId('trend-caption').textContent ?? '';
    expect(caption).toContain('At 12 GHz');
    expect(caption).toContain('Projected to leave the tolerance on 2025-06-02');
    expect(caption).toContain('probability of conformity 12.0 %');
    expect(chart.querySelectorAll('.recharts-errorBar').length).toBeGreaterThan(0);
    // The other frequency: no fit, no exit.
    fireEvent.click(within(chart).getByRole('button', { name: '8.5 GHz' }));
    const other = screen.getByTestId('trend-caption').textContent ?? '';
    expect(other).toContain('At 8.5 GHz');
    expect(other).toContain('Too few checks for a drift line');
    expect(other).toContain('Not projected to leave the tolerance');
  });

  it('shows flags with words and symbols, and the suggested interval with its method and rationale', async () => {
    render(
      <LabProvider api={historyBench().api}>
        <MeterPage assetId="WM-003" />
      </LabProvider>,
    );
    const flags = await screen.findByTestId('flags');
    const items = within(flags)
      .getAllByRole('listitem')
      .map((li) => li.textContent);
    // The stop sign is drawn, not a character some fonts lack.
    expect(items[0]).toMatch(/^ Stop Drift: the band reaches/);
    expect(within(flags).getAllByRole('listitem')[0]!.querySelector('svg.icon-stop')).toBeTruthy();
    expect(flags.textContent).not.toContain('⛔');
    expect(items[1]).toMatch(/^⚠ Warning The dip grows shallower/);
    const advice = screen.getByTestId('interval-advice').textContent ?? '';
    expect(advice).toContain('Suggested interval: 6 months (↓ shorter than now, 12 months)');
    expect(advice).toContain('held at the policy minimum');
    expect(advice).toContain('Method: variables-data method');
    expect(advice).toContain('6 months keeps it inside');
    expect(advice).toContain('do not print a suggested interval: that is a lab setting');
    expect(screen.getByTestId('pooled-drift').textContent).toContain('+80.0 ppm/year ± 4.0 ppm/year');
  });

  it('says so when the drift cannot be worked out, and the rest of the page still shows', async () => {
    const { api } = fakeBench();
    render(
      <LabProvider api={api}>
        <MeterPage assetId="WM-003" />
      </LabProvider>,
    );
    expect((await screen.findByText(/The drift could not be worked out/)).getAttribute('role')).toBe('alert');
    expect(screen.getByRole('heading', { name: 'Checks' })).toBeTruthy();
  });

  it('turns a trend into chart rows and picks the frequency to watch', () => {
    const f = TREND.frequencies[1]!;
    const rows = trendRows(f);
    expect(rows.points).toHaveLength(5);
    expect(rows.points[0]).toEqual({ t: Date.UTC(2021, 0, 15), errorPpm: 300, uPpm: 20 });
    expect(rows.band[1]).toEqual({ t: Date.UTC(2023, 0, 15), predictedPpm: 600, band: [559, 641] });
    expect(firstToWatch(TREND.frequencies)).toBe(1);
    expect(firstToWatch([TREND.frequencies[0]!])).toBe(0);
    expect([roundUp(1041), roundUp(95), roundUp(3), roundUp(0)]).toEqual([1200, 96, 3, 1]);
    expect([formatProbability(0.99999), formatProbability(0.12), formatProbability(1e-6)]).toEqual([
      '> 99.9 %',
      '12.0 %',
      '< 0.1 %',
    ]);
    expect(yearTicks(Date.UTC(2020, 5, 1), Date.UTC(2024, 5, 1))).toEqual(
      [2021, 2022, 2023, 2024].map((y) => Date.UTC(y, 0, 1)),
    );
    expect(yearTicks(Date.UTC(2000, 5, 1), Date.UTC(2040, 5, 1))[0]).toBe(Date.UTC(2005, 0, 1));
  });
});

describe('dip depth and loaded Q on a meter page', () => {
  it('draws dip depth with the minimum dip line, and loaded Q where sweeps exist', async () => {
    render(
      <LabProvider api={historyBench().api}>
        <MeterPage assetId="WM-003" />
      </LabProvider>,
    );
    const chart = await screen.findByRole('figure', { name: 'Dip depth and loaded Q against time' });
    await waitFor(() => expect(chart.textContent).toContain('loaded Q (no unit)'));
    const text = chart.textContent ?? '';
    expect(text).toContain('dip depth / dB');
    expect(text).toContain('check date / year');
    expect(text).toContain('minimum dip 1 dB');
    expect(text).toContain('loaded Q of each swept point');
    const caption = screen.getByTestId('health-caption').textContent ?? '';
    expect(caption).toContain('Dip trend -0.38 dB/year');
    expect(caption).toContain('⚠ Projected to reach the minimum on 2026-08-01');
  });

  it('says there is no loaded Q when no sweeps were attached', async () => {
    render(
      <LabProvider api={historyBench([]).api}>
        <MeterPage assetId="WM-003" />
      </LabProvider>,
    );
    await waitFor(() =>
      expect(screen.getByTestId('health-caption').textContent).toContain('No sweeps attached'),
    );
    const chart = screen.getByRole('figure', { name: 'Dip depth and loaded Q against time' });
    expect(chart.textContent).not.toContain('loaded Q (no unit)');
  });
});

describe('revisions, signatures and audit on a meter page', () => {
  it('names each revision state in words and lists who signed with what meaning', async () => {
    render(
      <LabProvider api={historyBench().api}>
        <MeterPage assetId="WM-003" />
      </LabProvider>,
    );
    const table = await screen.findByTestId('revisions');
    const rows = within(table).getAllByRole('row').slice(1);
    expect(rows).toHaveLength(2);
    const newest = rows[0]!.textContent ?? '';
    expect(newest).toContain('rev. 1: ✎ not signed yet');
    expect(newest).toContain('none yet; waits for “performed”');
    const amended = rows[1]!.textContent ?? '';
    expect(amended).toContain('rev. 1: ↻ amended');
    expect(amended).toContain('rev. 2: ✔✔ reviewed — “reading at 12 GHz mistyped”, Tess Quarry (in effect)');
    expect(amended).toContain('✔ performed by Tess Quarry (technician), 2024-02-01 10:05 UTC');
    expect(amended).toContain('✔ reviewed by Omar Vell (reviewer)');
    expect(revisionWord({ state: 'signed' }, ['performed'])).toBe('✔ performed');
    expect(revisionWord({ state: 'draft' }, [])).toBe('✎ not signed yet');
  });

  it('shows the audit entries of the meter, its checks and its documents only, newest first', async () => {
    const bench = historyBench();
    const asked: unknown[] = [];
    const listAudit = bench.api.listAudit.bind(bench.api);
    bench.api.listAudit = (q) => {
      asked.push(q);
      return listAudit(q);
    };
    render(
      <LabProvider api={bench.api}>
        <MeterPage assetId="WM-003" />
      </LabProvider>,
    );
    const table = await screen.findByTestId('audit');
    const rows = within(table)
      .getAllByRole('row')
      .slice(1)
      .map((r) => r.textContent);
    expect(rows).toHaveLength(2);
    expect(rows[0]).toContain('40');
    expect(rows[0]).toContain('check 12');
    expect(rows[1]).toContain('meter WM-003');
    // One call for the whole meter, not one per check.
    expect(asked).toEqual([{ meter: 'WM-003', limit: 1000 }]);
  });
});

describe('documents', () => {
  const REPORT: VerifyReport = {
    ok: false,
    sha256: 'ff'.repeat(32),
    document: { number: 'CERT-0001', revision: 1, kind: 'certificate' },
    check: { checkId: 7, revision: 2, meter: 'WM-003', date: '2024-01-10' },
    findings: [
      { check: 'record attached', status: 'ok', detail: 'the attached record matches its digest' },
      { check: 'bytes as issued', status: 'fail', detail: 'the file differs from the one issued' },
      { check: 'PDF signature', status: 'not-checked', detail: 'no embedded signature' },
    ],
  };

  it('lists issued documents from the navigation bar', async () => {
    window.location.hash = '#/documents';
    render(<App api={historyBench().api} />);
    expect(await screen.findByRole('heading', { level: 1, name: 'Documents' })).toBeTruthy();
    const table = await screen.findByTestId('documents');
    const row = within(table).getAllByRole('row')[1]!.textContent ?? '';
    expect(row).toContain('CERT-0001');
    expect(row).toContain('certificate');
    expect(row).toContain('20.0 KiB');
    expect(row).toContain('● current');
  });

  it('reads a picked PDF, sends its bytes as base64 and shows each finding with ok or FAIL', async () => {
    const sent: string[] = [];
    const bench = historyBench();
    bench.api.verifyDocument = (input) => {
      sent.push(input.pdfBase64);
      return Promise.resolve(structuredClone(REPORT));
    };
    render(
      <LabProvider api={bench.api}>
        <DocumentsPage />
      </LabProvider>,
    );
    const bytes = new Uint8Array([0x25, 0x50, 0x44, 0x46, 0x2d, 0x31, 0x2e, 0x37, 0x0a, 0xff, 0x00]);
    const file = new File([bytes], 'returned.pdf', { type: 'application/pdf' });
    fireEvent.change(screen.getByLabelText('PDF to verify'), { target: { files: [file] } });
    const result = await screen.findByTestId('verify-result');
    expect(sent).toEqual([Buffer.from(bytes).toString('base64')]);
    const text = result.textContent ?? '';
    expect(text).toContain('✗ NOT VERIFIED: returned.pdf is certificate CERT-0001 revision 1 of WM-003');
    const findings = within(result)
      .getAllByRole('listitem')
      .map((li) => li.textContent);
    expect(findings).toEqual([
      '✓ ok record attached: the attached record matches its digest',
      '✗ FAIL bytes as issued: the file differs from the one issued',
      '– not checked PDF signature: no embedded signature',
    ]);
  });

  it('encodes large files in slices exactly as Node does', () => {
    const big = new Uint8Array(100_000).map((_, i) => (i * 31) % 256);
    expect(bytesToBase64(big)).toBe(Buffer.from(big).toString('base64'));
  });
});
