// `npm run bench`: runs every *.bench.ts beside this file and prints one line per figure:
// name, value, floor, ratio. Every figure is "higher is better"; the floor is the least acceptable
// value and ratio = value / floor, so a ratio below 1 misses the target (exit code 1).
// Speed targets live here, never in timed unit tests.
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

const dir = path.dirname(fileURLToPath(import.meta.url));
const files = readdirSync(dir)
  .filter((f) => f.endsWith('.bench.ts'))
  .sort();
const rows: string[][] = [];
let missed = 0;
for (const f of files) {
  const mod = (await import(pathToFileURL(path.join(dir, f)).href)) as BenchModule;
  for (const fig of await mod.figures()) {
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
