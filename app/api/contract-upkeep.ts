// Keeping a lab up to date: a meter's specification edited as an audited revision, the register
// imported from and exported to its CSV, a standard's new certificates and retirement, and
// people's keys, roles and leaving.
import type { MeterDetail, Person, Standard } from '../model/records';
import type { Signer } from '../model/revisions';
import type { PersonInput, StandardInput } from './schemas';

export interface MeterEditInput {
  assetId: string;
  /** Why the specification changes; kept with the revision and in the trail. */
  reason: string;
  /** Only the fields of a meter document that change (not assetId, not state). */
  changes: Record<string, unknown>;
}

export interface RegisterImportInput {
  /** The register CSV (docs/exchange.md). */
  csv: string;
  /** Check every row and say what would be added; write nothing. */
  dryRun?: boolean;
}

export interface RegisterImportResult {
  dryRun: boolean;
  /** The meters added (or that would be), with the line each came from. */
  meters: { line: number; assetId: string; description: string }[];
}

export interface StandardCertificateInput {
  assetId: string;
  certificate: NonNullable<StandardInput['certificates']>[number];
}

export interface RetireStandardInput {
  assetId: string;
  reason: string;
}

export interface RekeySignerInput {
  name: string;
  /** Seals the new private key; never stored, never shown. */
  passphrase: string;
}

export interface ChangeRoleInput {
  name: string;
  role: PersonInput['role'];
  reason?: string;
}

export interface PersonLeftInput {
  name: string;
  reason?: string;
}

export interface UpkeepApi {
  /** A new revision of a meter's specification: the given fields change, the old values are
   * kept; results already stored keep theirs; due dates and verdicts follow from today. */
  editMeter(input: MeterEditInput): Promise<MeterDetail>;
  /** All rows or none; every refusal names the line, column, value and what was expected. */
  importRegister(input: RegisterImportInput): Promise<RegisterImportResult>;
  exportRegister(): Promise<string>;
  addStandardCertificate(input: StandardCertificateInput): Promise<Standard>;
  retireStandard(input: RetireStandardInput): Promise<Standard>;
  /** A new signing key for a person (a forgotten passphrase); old signatures stay verifiable. */
  rekeySigner(input: RekeySignerInput): Promise<Signer>;
  changeRole(input: ChangeRoleInput): Promise<Person>;
  /** They keep their signatures and cannot sign again. */
  markPersonLeft(input: PersonLeftInput): Promise<Person>;
}

export const UPKEEP_OPERATIONS = {
  editMeter: 'write',
  importRegister: 'write',
  exportRegister: 'read',
  addStandardCertificate: 'write',
  retireStandard: 'write',
  rekeySigner: 'write',
  changeRole: 'write',
  markPersonLeft: 'write',
} as const satisfies Record<keyof UpkeepApi, 'read' | 'write'>;
