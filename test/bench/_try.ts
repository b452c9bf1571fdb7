import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { openApi } from '../../app/api/open';
import { clock } from '../../test/fixtures/lab';
import { createFleet, historyCsv } from '../../test/bench/fleet-data';
const N = Number(process.env.N ?? 40);
const file = path.join(mkdtempSync(path.join(tmpdir(), 'fl-')), 'f.dipledger');
const lab = openApi(file, { create: true, clock });
let t = performance.now();
await createFleet(lab.api, N);
console.log('fleet', performance.now() - t);
let gen = 0, imp = 0, checks = 0;
for (let i = 0; i < N; i += 20) {
  t = performance.now();
  const h = historyCsv(i, Math.min(N, i + 20));
  gen += performance.now() - t;
  t = performance.now();
  const r = await lab.api.importCsv(h.csv);
  imp += performance.now() - t;
  checks += r.checksImported;
}
console.log({ gen, imp, checks, rate: checks / imp * 1000 });
t = performance.now();
const due = await lab.api.listDue({ withinDays: 3650 });
console.log('listDue', performance.now() - t, due.filter(d => d.flags?.length).length, due.slice(0,5).map(d=>d.flags));
const counts: Record<string, number> = {};
for (const d of due) for (const f of d.flags ?? []) { const k = f.replace(/[\d-]+/g,'#'); counts[k] = (counts[k]??0)+1; }
console.log(counts);
for (const id of ['FL-00001','FL-00002','FL-00003']) {
  t = performance.now();
  await lab.api.getMeter(id);
  const a = performance.now();
  const tr = await lab.api.getTrend(id);
  const b = performance.now();
  await lab.api.fitForUse({ assetId: id, frequency: `${(tr.frequencies[3]?.frequencyHz ?? 3e9)} Hz` });
  console.log(id, a - t, b - a, performance.now() - b, tr.suggestion.method);
}
lab.close();
