// The machine-readable record a document carries (a PDF/A-3 associated file): the check as an
// exchange document ("dipledger.check/1", so `dipledger record` can read it back), the check as
// recorded with every computed result, the signatures on it, and the document's identity.
import { createHash } from 'node:crypto';
import { decodeJson, encodeJson } from '../model/json';
import type { CheckRecord } from '../model/records';
import type {
  CheckDocumentData,
  DocumentSignature,
  IntervalSuggestion,
  IssueInfo,
  StandardUsed,
} from './model';

export const RECORD_MEDIA_TYPE = 'application/json';

export interface EmbeddedRecord {
  format: 'dipledger.check/1';
  meter: string;
  date: string;
  performer: string;
  standards: string[];
  method: CheckRecord['method'];
  conditions: CheckRecord['conditions'];
  adjusted: boolean;
  remarks: string;
  points: {
    phase: 'as-found' | 'as-left';
    reference: string;
    standard: string;
    dipDepthDb?: number;
    readings: { value: string | number; direction: 'up' | 'down' }[];
  }[];
  /** The check exactly as recorded and signed, with the engine's results. */
  record: CheckRecord;
  /** What the signatures cover, so anyone can rebuild the signed bytes (see signatures.ts). */
  signedContent: unknown;
  signatures: DocumentSignature[];
  document: IssueInfo;
  /** The rest of what the pages were drawn from, so `verify` can draw them again and compare
   * (absent from documents issued before documents were signed as PDFs). */
  rendering?: RenderingInputs;
}

/** Version of the page layout; `verify` redraws only the layouts this program draws. */
export const LAYOUT = 'dipledger.layout/1';

export interface RenderingInputs {
  layout: string;
  lab: CheckDocumentData['lab'];
  meter: CheckDocumentData['meter'];
  standards: StandardUsed[];
  suggestedInterval: IntervalSuggestion | null;
}

export function buildRecord(data: CheckDocumentData, dialKind: 'direct' | 'divisions'): EmbeddedRecord {
  const c = data.check;
  return {
    format: 'dipledger.check/1',
    meter: c.meterAssetId,
    date: c.date,
    performer: c.performer,
    standards: c.standards,
    method: c.method,
    conditions: c.conditions,
    adjusted: c.adjusted,
    remarks: c.remarks,
    points: c.points.map((p) => ({
      phase: p.phase,
      reference: `${p.referenceHz} Hz`,
      standard: p.standardAssetId,
      ...(p.dipDepthDb === null ? {} : { dipDepthDb: p.dipDepthDb }),
      readings: p.readings.map((r) => ({
        value: dialKind === 'direct' ? `${r.value} Hz` : r.value,
        direction: r.direction,
      })),
    })),
    record: c,
    signedContent: data.signedContent,
    signatures: data.signatures,
    document: data.issue,
    rendering: {
      layout: LAYOUT,
      lab: data.lab,
      meter: data.meter,
      standards: data.standards,
      suggestedInterval: data.suggestedInterval,
    },
  };
}

/** What the pages were drawn from, rebuilt from an embedded record that carries it. */
export function documentDataOf(r: EmbeddedRecord): CheckDocumentData | null {
  if (!r.rendering) return null;
  return {
    lab: r.rendering.lab,
    meter: r.rendering.meter,
    check: r.record,
    standards: r.rendering.standards,
    signatures: r.signatures,
    signedContent: r.signedContent,
    issue: r.document,
    suggestedInterval: r.rendering.suggestedInterval,
  };
}

export function recordFileName(data: { check: CheckRecord; issue: IssueInfo }): string {
  return `${data.issue.number}-r${data.issue.revision}-check-${data.check.checkId}-r${data.check.revision}.json`;
}

/** The bytes attached to the PDF (JSON that keeps infinite degrees of freedom; see api/json.ts). */
export function encodeRecord(r: EmbeddedRecord): Buffer {
  return Buffer.from(encodeJson(r, 2), 'utf8');
}

export function decodeRecord(bytes: Buffer): unknown {
  return decodeJson(bytes.toString('utf8'));
}

export function sha256Hex(bytes: Buffer | string): string {
  return createHash('sha256').update(bytes).digest('hex');
}
