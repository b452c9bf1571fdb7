// Creates a lab file, optionally filled with the invented demo lab from bundle.json, through
// the LabApi only (the same validation a user's documents get).
import { readFileSync, existsSync, rmSync } from 'node:fs';
import type { LabApi } from '../app/api/contract';
import { openApi } from '../app/api/open';
import type { Clock } from '../app/api/service';
import type {
  CheckDocumentInput,
  LabSettingsInput,
  MeterInput,
  PersonInput,
  StandardInput,
} from '../app/api/schemas';
import { LabError } from '../app/api/errors';

export interface SampleBundle {
  format: 'dipledger.sample/1';
  lab: LabSettingsInput;
  people: PersonInput[];
  standards: StandardInput[];
  meters: (MeterInput & { stateReason?: string })[];
  checks: CheckDocumentInput[];
}

export const BUNDLE_URL = new URL('./bundle.json', import.meta.url);

export function readSampleBundle(): SampleBundle {
  return JSON.parse(readFileSync(BUNDLE_URL, 'utf8')) as SampleBundle;
}

export async function loadBundle(api: LabApi, bundle: SampleBundle): Promise<void> {
  await api.updateLab(bundle.lab);
  for (const p of bundle.people) await api.createPerson(p);
  for (const s of bundle.standards) await api.createStandard(s);
  // History is recorded while every meter is in service; the present states come last, as
  // they did in the story (a meter is withdrawn after its last check, not before).
  for (const m of bundle.meters) await api.createMeter({ ...m, state: 'in-service' });
  for (const c of bundle.checks) await api.recordCheck(c);
  for (const m of bundle.meters) {
    if (m.state && m.state !== 'in-service') {
      await api.changeMeterState({
        assetId: m.assetId,
        state: m.state,
        reason: m.stateReason ?? 'state in the demo story',
      });
    }
  }
}

/** Creates `file` (refusing to overwrite one) with default settings or the demo lab. */
export async function createLabFile(
  file: string,
  withSample: boolean,
  options: { clock?: Clock; name?: string } = {},
): Promise<void> {
  if (file !== ':memory:' && existsSync(file)) {
    throw new LabError('conflict', `${file} already exists; choose another file or remove it first`);
  }
  const lab = openApi(file, { create: true, clock: options.clock });
  try {
    if (withSample) await loadBundle(lab.api, readSampleBundle());
    else await lab.api.updateLab({ name: options.name ?? 'New laboratory' });
    // The lab's document-signing key and certificate, made now with the lab's name.
    await lab.api.documentCertificate();
    lab.close();
  } catch (e) {
    // A half-made lab file is worse than none: remove it so the user can simply retry.
    lab.close();
    if (file !== ':memory:') for (const f of [file, `${file}-wal`, `${file}-shm`]) rmSync(f, { force: true });
    throw e;
  }
}
