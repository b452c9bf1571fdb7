// The register page's answer: every meter's row with its history flags.
import { registerRows } from '../../../db/queries/meters';
import type { RegisterApi, RegisterEntry } from '../contract-register';
import { registerFlagsAll } from '../history/flags';
import type { OpGroup, ServiceContext } from './context';
import { registerRowOf } from './lookups';

export function listRegister(ctx: ServiceContext): RegisterEntry[] {
  const rows = registerRows(ctx.db).map((r) => registerRowOf(ctx, r));
  const flags = registerFlagsAll(ctx, rows);
  return rows.map((r, i) => ({ ...r, flags: flags[i] ?? [] }));
}

export const registerOps = { listRegister } satisfies OpGroup<keyof RegisterApi>;
