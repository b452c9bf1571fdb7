// The lab client every view talks through, given once at the top of the window and read with
// useLab() wherever a component needs it, instead of being handed down through every view.
import { createContext, useContext } from 'react';
import type { ReactNode } from 'react';
import type { LabApi } from '../../../app/api/contract';

const LabContext = createContext<LabApi | null>(null);

export function LabProvider({ api, children }: { api: LabApi; children: ReactNode }) {
  return <LabContext.Provider value={api}>{children}</LabContext.Provider>;
}

export function useLab(): LabApi {
  const api = useContext(LabContext);
  if (!api) throw new Error('useLab() needs a <LabProvider> above it');
  return api;
}
