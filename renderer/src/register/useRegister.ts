// The register's data in one place: the lab and its meters, their drift and health flags, and
// the band coverage, each loading on its own so the table shows first. The flags come from the
// register's own operation (listRegister: every meter, withdrawn ones too).
import { useEffect, useMemo, useState } from 'react';
import type { LabApi, LabSettings, RegisterRow } from '../../../app/api/contract';
import type { CoverageReport } from '../../../app/api/contract-history';
import { useLab } from '../lab/LabContext';
import { messageOf, useLoad } from '../shared/useLoad';
import type { Load as Loading } from '../shared/useLoad';

type Flags = NonNullable<RegisterRow['flags']>;

/** Each meter's flags by asset id. */
export async function registerFlags(api: LabApi): Promise<Map<string, Flags>> {
  const entries = await api.listRegister();
  return new Map(entries.map((r) => [r.assetId, r.flags]));
}

export type RegisterLoad =
  | { kind: 'loading' }
  | { kind: 'failed'; message: string }
  | { kind: 'ready'; lab: LabSettings; rows: RegisterRow[] };

export interface RegisterData {
  load: RegisterLoad;
  /** The meters with their flags once those came (without until then). */
  rows: RegisterRow[];
  flagLoad: Loading<Map<string, Flags>>;
  coverageLoad: Loading<CoverageReport>;
}

export function useRegister(): RegisterData {
  const api = useLab();
  const [load, setLoad] = useState<RegisterLoad>({ kind: 'loading' });
  useEffect(() => {
    let live = true;
    Promise.all([api.getLab(), api.listMeters()])
      .then(([lab, rows]) => live && setLoad({ kind: 'ready', lab, rows }))
      .catch((e: unknown) => live && setLoad({ kind: 'failed', message: messageOf(e) }));
    return () => {
      live = false;
    };
  }, [api]);
  const [flagLoad] = useLoad(() => registerFlags(api), [api]);
  const [coverageLoad] = useLoad<CoverageReport>(() => api.coverage(), [api]);
  const rows = useMemo(() => {
    const base = load.kind === 'ready' ? load.rows : [];
    if (flagLoad.kind !== 'ready') return base;
    return base.map((r) => ({ ...r, flags: flagLoad.value.get(r.assetId) ?? [] }));
  }, [load, flagLoad]);
  return { load, rows, flagLoad, coverageLoad };
}
