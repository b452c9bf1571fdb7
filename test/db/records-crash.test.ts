// Crash safety: an import of 5,000 checks in a child process is killed with SIGKILL at random
// moments (fixed seed); every time the file must open, pass SQLite's integrity check and the
// records integrity check, and hold either the whole import or none of it (one transaction,
// WAL journal). Timing of a kill is the one thing a seed cannot fix; the moments are spread
// over the measured length of an uninterrupted run so both outcomes occur.
import { spawn } from 'node:child_process';
import { copyFileSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { stringify } from 'csv-stringify/sync';
import { describe, expect, it } from 'vitest';
import { openApi } from '../../app/api/open';
import { CSV_COLUMNS } from '../../app/api/service';
import { openLabDb } from '../../db/store';
import { integrityReport as verifyIntegrity } from '../../app/api/ops/audit';
import { clock, seed } from '../fixtures/lab';
import { sized } from '../fixtures/test-level';

const CHILD = path.join(path.dirname(new URL(import.meta.url).pathname), 'records-child.ts');
const CHECKS = sized(5000, 1000);
const KILLS = sized(20, 4);

/** mulberry32: a small seeded generator, so the kill moments are the same on every run. */
function seeded(seedValue: number): () => number {
  let a = seedValue >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** One check a day on TW-01 from 2012-01-02, each one point with two readings. */
function historyCsv(): string {
  const rows: (string | number)[][] = [CSV_COLUMNS.slice()];
  const start = Date.UTC(2012, 0, 2);
  for (let i = 0; i < CHECKS; i++) {
    const date = new Date(start + i * 86400000).toISOString().slice(0, 10);
    for (const [reading, direction] of [
      [10.004e9 + (i % 7) * 1e5, 'up'],
      [10.003e9, 'down'],
    ] as const)
      rows.push([
        'TW-01',
        date,
        'Ada Fenwick',
        'SRC-LONG',
        'tune-to-dip',
        21.5,
        '',
        1008,
        '',
        42,
        '',
        'no',
        1,
        'as-found',
        10e9,
        'SRC-LONG',
        reading,
        'Hz',
        direction,
        '',
        '',
      ]);
  }
  return stringify(rows, { record_delimiter: '\r\n' });
}

function countChecks(file: string): number {
  const db = openLabDb(file);
  try {
    return (db.prepare('SELECT count(*) AS n FROM check_event').get() as { n: number }).n;
  } finally {
    db.close();
  }
}

/** Runs the import in a child; with `killAfterMs`, kills it that long after it starts importing.
 * Resolves with how it ended and how long the import ran. */
function runChild(
  file: string,
  csv: string,
  killAfterMs?: number,
): Promise<{ code: number | null; signal: string | null; importMs: number }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ['--import', 'tsx', CHILD, 'import', file, csv], {
      stdio: ['ignore', 'pipe', 'inherit'],
    });
    let timer: NodeJS.Timeout | undefined;
    let started = 0;
    child.stdout.on('data', (d: Buffer) => {
      if (!started && d.toString().includes('importing')) {
        started = Date.now();
        if (killAfterMs !== undefined) timer = setTimeout(() => child.kill('SIGKILL'), killAfterMs);
      }
    });
    child.on('exit', (code, signal) => {
      if (timer) clearTimeout(timer);
      resolve({ code, signal, importMs: started ? Date.now() - started : 0 });
    });
  });
}

describe('crash safety of a long import (SIGKILL at random moments)', () => {
  it(`holds all ${CHECKS} checks or none after each of ${KILLS} kills, and always passes integrity`, async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'dipledger-crash-'));
    const pristine = path.join(dir, 'pristine.dipledger');
    const lab = openApi(pristine, { create: true, clock });
    await seed(lab.api);
    await lab.api.createStandard({
      assetId: 'SRC-LONG',
      certificates: [
        {
          certificateId: 'L-1',
          issuedBy: 'Calibration body one',
          calibratedOn: '2011-06-01',
          dueOn: '2026-06-01',
          expandedUncertaintyPpm: 0.01,
        },
      ],
    });
    lab.close();
    const csv = path.join(dir, 'history.csv');
    writeFileSync(csv, historyCsv());

    // One uninterrupted run: the whole import, and how long it takes.
    const full = path.join(dir, 'full.dipledger');
    copyFileSync(pristine, full);
    const whole = await runChild(full, csv);
    expect([whole.code, whole.signal]).toEqual([0, null]);
    expect(countChecks(full)).toBe(CHECKS);

    // Kill moments from a fixed seed, spread over the import and a little past its end; two
    // children at a time, each on its own copy of the file, to keep the test short.
    const random = seeded(20261201);
    const moments = Array.from({ length: KILLS }, () => Math.round(random() * whole.importMs * 1.05));
    const outcomes = { all: 0, none: 0 };
    const lane = async (indexes: number[]) => {
      for (const i of indexes) {
        const file = path.join(dir, `kill-${i}.dipledger`);
        copyFileSync(pristine, file);
        const r = await runChild(file, csv, moments[i]);
        const n = countChecks(file);
        expect([0, CHECKS], `kill ${i} after ${moments[i]} ms (${r.signal ?? r.code})`).toContain(n);
        outcomes[n === 0 ? 'none' : 'all'] += 1;
        const db = openLabDb(file);
        const report = verifyIntegrity(db);
        db.close();
        expect(report.problems, `kill ${i}`).toEqual([]);
        expect(report.sqlite).toEqual(['ok']);
      }
    };
    const all = [...moments.keys()];
    await Promise.all([lane(all.filter((i) => i % 2 === 0)), lane(all.filter((i) => i % 2 === 1))]);
    expect(outcomes.none + outcomes.all).toBe(KILLS);
    // At least some kills must land inside the import, or the test proves nothing.
    expect(outcomes.none).toBeGreaterThan(0);
  }, 240_000);
});
