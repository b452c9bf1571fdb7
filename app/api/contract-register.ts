// The register group: every meter's register row with its history flags, as the register page
// shows them (the due list gives the same flags, but only for meters falling due).
import type { RegisterRow } from '../model/records';

/** A register row whose history flags are always filled. */
export type RegisterEntry = RegisterRow & { flags: string[] };

export interface RegisterApi {
  /** Every meter in the register (withdrawn ones too), in the register's order, each with the
   * short words of its history flags worth attention (drift, steps, dip health). */
  listRegister(): Promise<RegisterEntry[]>;
}

export const REGISTER_OPERATIONS = {
  listRegister: 'read',
} as const satisfies Record<keyof RegisterApi, 'read' | 'write'>;
