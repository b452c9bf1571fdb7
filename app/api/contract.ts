// The one service contract of Dipledger. IPC (desktop), the loopback HTTP server, the CLI
// and the tests all speak this interface; the clients are derived from it, so renaming an
// operation breaks the build rather than a user.
import type {
  LabSettings,
  Meter,
  RegisterRow,
  Standard,
  Person,
  CheckRecord,
  MeterDetail,
  AirResult,
} from '../model/records';
import type { PointResult } from '../engine/model';
import type {
  CheckDocumentInput,
  BudgetDocumentInput,
  MeterInput,
  MeterStateInput,
  StandardInput,
  PersonInput,
  LabSettingsInput,
  AirInput,
} from './schemas';
import { DRAFTS_OPERATIONS, type DraftsApi } from './contract-drafts';
import { RECORDS_OPERATIONS, type RecordsApi } from './contract-records';
import { HISTORY_OPERATIONS, type HistoryApi } from './contract-history';
import { SWEEP_OPERATIONS, type SweepApi } from './contract-sweep';
import { DOCUMENTS_OPERATIONS, type DocumentsApi } from './contract-documents';
import { DCC_OPERATIONS, type DccApi } from './contract-dcc';
import { REGISTER_OPERATIONS, type RegisterApi } from './contract-register';
import { IMPACT_OPERATIONS, type ImpactApi } from './contract-impact';
import { UPKEEP_OPERATIONS, type UpkeepApi } from './contract-upkeep';

export type {
  LabSettings,
  Meter,
  RegisterRow,
  StandardCertificate,
  Standard,
  Person,
  CheckPointRecord,
  CheckState,
  CheckRecord,
  CheckSummary,
  MeterDetail,
  AirResult,
} from '../model/records';

export interface ImportResult {
  metersSeen: number;
  checksImported: number;
  pointsImported: number;
}

export interface DueQuery {
  withinDays: number;
}

/** Every operation of the product: the core below and the groups in contract-*.ts files.
 * Inputs are unvalidated data at runtime; the service validates them and rejects with a
 * LabError (see errors.ts). */
export type LabApi = CoreApi &
  DraftsApi &
  HistoryApi &
  RecordsApi &
  SweepApi &
  DocumentsApi &
  DccApi &
  RegisterApi &
  ImpactApi &
  UpkeepApi;

/** The foundation: register, meters, standards, people, checks, computations, CSV. */
export interface CoreApi {
  getLab(): Promise<LabSettings>;
  updateLab(input: LabSettingsInput): Promise<LabSettings>;

  listMeters(): Promise<RegisterRow[]>;
  getMeter(assetId: string): Promise<MeterDetail>;
  createMeter(input: MeterInput): Promise<Meter>;
  /** Quarantine, withdraw or return to service; always with a reason, always audited. */
  changeMeterState(input: MeterStateInput): Promise<Meter>;
  listDue(query: DueQuery): Promise<RegisterRow[]>;

  listStandards(): Promise<Standard[]>;
  createStandard(input: StandardInput): Promise<Standard>;

  listPeople(): Promise<Person[]>;
  createPerson(input: PersonInput): Promise<Person>;

  recordCheck(input: CheckDocumentInput): Promise<CheckRecord>;
  getCheck(checkId: number): Promise<CheckRecord>;

  /** Pure computations exposed for the CLI and the UI. */
  evaluateBudget(input: BudgetDocumentInput): Promise<PointResult>;
  airRefractivity(input: AirInput): Promise<AirResult>;

  importCsv(csvText: string): Promise<ImportResult>;
  exportCsv(): Promise<string>;
}

export type OperationName = keyof LabApi;

/** Core operations, and whether each writes. */
export const CORE_OPERATIONS = {
  getLab: 'read',
  updateLab: 'write',
  listMeters: 'read',
  getMeter: 'read',
  createMeter: 'write',
  changeMeterState: 'write',
  listDue: 'read',
  listStandards: 'read',
  createStandard: 'write',
  listPeople: 'read',
  createPerson: 'write',
  recordCheck: 'write',
  getCheck: 'read',
  evaluateBudget: 'read',
  airRefractivity: 'read',
  importCsv: 'write',
  exportCsv: 'read',
} as const satisfies Record<keyof CoreApi, 'read' | 'write'>;

/** The list clients are built from; `satisfies` makes a missing or extra name a build error.
 * Each group's list (in its contract-*.ts file) is spread in here. */
export const OPERATIONS = {
  ...CORE_OPERATIONS,
  ...DRAFTS_OPERATIONS,
  ...RECORDS_OPERATIONS,
  ...HISTORY_OPERATIONS,
  ...DOCUMENTS_OPERATIONS,
  ...SWEEP_OPERATIONS,
  ...DCC_OPERATIONS,
  ...REGISTER_OPERATIONS,
  ...IMPACT_OPERATIONS,
  ...UPKEEP_OPERATIONS,
} as const satisfies Record<OperationName, 'read' | 'write'>;
