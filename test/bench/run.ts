// `npm run bench`: runs every *.bench.ts beside this file and prints one line per figure:
// name, value, floor, ratio. Every figure is "higher is better"; the floor is the least acceptable
// value and ratio = value / floor, so a ratio below 1 misses the target (exit code 1).
// Speed targets live here, never in timed unit tests.
// Each *.bench.ts runs in a process of its own, so a figure such as peak resident memory belongs
// to the benchmark that reports it (in one shared process the fleet's figure was the peak left by
// the document and fit benchmarks before it: 900 MB of RSS with 29 MB of live heap).
import { spawnSync } from 'node:child_process';
import { readdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

export interface BenchFigure {
  name: string;
  value: number;
  floor: number;
}

interface BenchModule {
  figures(): Promise<BenchFigure[]> | BenchFigure[];
}

const self = fileURLToPath(import.meta.url);
const dir = path.dirname(self);
/** Marks the line a child process prints its figures on, apart from anything else on stdout. */
const FIGURES_MARK = 'dipledger-bench-figures ';

/** Runs one benchmark file in a fresh process (same node, same loader flags) for its figures. */
function figuresOf(file: string): BenchFigure[] {
  const child = spawnSync(process.execPath, [...process.execArgv, self, '--only', file], {
    stdio: ['ignore', 'pipe', 'inherit'],
    encoding: 'utf8',
    maxBuffer: 64 * 1024 * 1024,
  });
  const line = child.stdout.split('\n').find((l) => l.startsWith(FIGURES_MARK));
  if (child.status !== 0 || !line)
    throw new Error(`${file}: the benchmark process failed (exit ${child.status ?? child.signal})`);
  return JSON.parse(line.slice(FIGURES_MARK.length)) as BenchFigure[];
}

const only = process.argv.indexOf('--only');
if (only >= 0) {
  const mod = (await import(pathToFileURL(path.join(dir, process.argv[only + 1] ?? '')).href)) as BenchModule;
  console.log(FIGURES_MARK + JSON.stringify(await mod.figures()));
  process.exit(0);
}

const files = readdirSync(dir)
  .filter((f) => f.endsWith('.bench.ts'))
  .sort();
const rows: string[][] = [];
let missed = 0;
for (const f of files) {
  for (const fig of figuresOf(f)) {
    const ratio = fig.value / fig.floor;
    if (!(ratio >= 1)) missed++;
    rows.push([
      `${f.replace(/\.bench\.ts$/, '')}: ${fig.name}`,
      fig.value.toPrecision(4),
      fig.floor.toPrecision(3),
      ratio.toFixed(2),
    ]);
  }
}
const header = ['name', 'value', 'floor', 'ratio'];
const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => (r[i] ?? '').length)));
const line = (cells: string[]) =>
  cells.map((c, i) => (i === 0 ? c.padEnd(widths[i] ?? 0) : c.padStart(widths[i] ?? 0))).join('  ');
console.log(line(header));
for (const r of rows) console.log(line(r));
if (missed > 0) {
  console.log(`${missed} figure(s) below their floor`);
  process.exitCode = 1;
}
