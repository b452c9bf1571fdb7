// A check validated against the lab's records and computed, ready to be written.
import type { Conditions, PointResult, Reading, Verdict } from '../../engine/model';
import type { MeterRecord } from '../../../db/queries/meters';
import type { StandardRecord } from '../../../db/queries/standards';
import type { SweepData } from '../../../db/queries/sweeps';
import type { Person } from '../contract';
import type { CheckDocument } from '../schemas';

export interface PreparedPoint {
  phase: 'as-found' | 'as-left';
  referenceHz: number;
  standard: StandardRecord;
  certificate: StandardRecord['certificates'][number];
  readings: Reading[];
  dipDepthDb: number | null;
  result: PointResult;
  /** Sweep method: the graduation set, the raw trace and its fit; stored by writeCheck. */
  sweep?: SweepData;
}

export interface PreparedCheck {
  doc: CheckDocument;
  meter: MeterRecord;
  performer: Person | undefined;
  conditions: Conditions;
  standards: { record: StandardRecord; certificate: StandardRecord['certificates'][number] }[];
  points: PreparedPoint[];
  asFoundVerdict: Verdict | null;
  asLeftVerdict: Verdict | null;
  worstUsedFraction: number | null;
  /** Standards used outside their calibration, let through by a permissive lab policy. */
  exceptions: string[];
}
