import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { openApi } from '../../app/api/open';
import { clock } from '../fixtures/lab';
import { createFleet, historyCsv } from './fleet-data';
const N = Number(process.env.N ?? 40);
const file = path.join(mkdtempSync(path.join(tmpdir(), 'fl-')), 'f.dipledger');
const lab = openApi(file, { create: true, clock });
await createFleet(lab.api, N);
const csvs = [] as string[];
for (let i = 0; i < N; i += 20) csvs.push(historyCsv(i, Math.min(N, i + 20)).csv);
const t = performance.now();
for (const c of csvs) await lab.api.importCsv(c);
console.log('import', performance.now() - t);
if (process.env.DUE) { const t2 = performance.now(); await lab.api.listDue({ withinDays: 3650 }); console.log('due', performance.now() - t2); }
lab.close();
