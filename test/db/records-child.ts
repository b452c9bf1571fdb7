// A child process for the crash-safety and concurrency tests of the records work: it imports a
// CSV into a lab file (to be killed part way), or writes through the API or the CLI in a loop
// while another process does the same. Run with `node --import tsx`.
import { readFileSync } from 'node:fs';
import { openApi } from '../../app/api/open';
import { fixedClock } from '../../app/api/service';
import { runCli } from '../../app/cli/main';

const [mode, file, arg] = process.argv.slice(2);
const clock = fixedClock('2026-12-01T09:30:00.000Z');

async function waitForGo(): Promise<void> {
  process.stdout.write('ready\n');
  await new Promise<void>((resolve) => process.stdin.once('data', () => resolve()));
  process.stdin.pause();
}

async function main(): Promise<number> {
  if (!file) throw new Error('usage: records-child MODE FILE ARG');
  if (mode === 'import') {
    const csv = readFileSync(arg ?? '', 'utf8');
    const lab = openApi(file, { clock });
    process.stdout.write('importing\n');
    const r = await lab.api.importCsv(csv);
    lab.close();
    process.stdout.write(`imported ${r.checksImported}\n`);
    return 0;
  }
  const n = Number(arg);
  if (mode === 'app') {
    // The running app: one long-lived connection writing through the API.
    const lab = openApi(file, { clock, actor: 'app' });
    await waitForGo();
    const start = Date.UTC(2025, 6, 1);
    for (let i = 0; i < n; i++) {
      const date = new Date(start + i * 86400000).toISOString().slice(0, 10);
      await lab.api.recordCheck({
        format: 'dipledger.check/1',
        meter: 'TW-01',
        date,
        performer: 'Ada Fenwick',
        standards: ['SRC-A'],
        conditions: { temperatureC: 21, pressureHpa: 1010, humidityPct: 40 },
        points: [
          {
            reference: '10 GHz',
            readings: [
              { value: '10.004 GHz', direction: 'up' },
              { value: '10.003 GHz', direction: 'down' },
            ],
          },
        ],
      });
    }
    lab.close();
    return 0;
  }
  if (mode === 'cli') {
    // The command line: a new process's worth of work per command (open, write, close).
    const out: string[] = [];
    const io = {
      out: (t: string) => out.push(t),
      err: (t: string) => out.push(t),
      env: {},
      cwd: process.cwd(),
      clock,
    };
    await waitForGo();
    for (let i = 0; i < n; i++) {
      const command = i % 2 === 0 ? 'quarantine' : 'reinstate';
      const code = await runCli(['--db', file, command, 'TW-02', '--reason', `concurrent change ${i}`], io);
      if (code !== 0) {
        process.stdout.write(`FAILED ${i}: ${out.join(' | ')}\n`);
        return 1;
      }
    }
    return 0;
  }
  throw new Error(`unknown mode ${mode}`);
}

main().then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    process.stdout.write(`ERROR ${e instanceof Error ? e.message : String(e)}\n`);
    process.exitCode = 3;
  },
);
