// Drafts of checks being recorded: the UI saves the in-progress exchange document as it is
// typed, so closing the window loses nothing. A draft is scratch work and may be incomplete;
// it becomes a record only through recordCheck.

/** What saveDraft takes: the document as typed, and the draft it replaces (none: a new draft). */
export interface DraftInput {
  draftId?: number;
  /** The in-progress dipledger.check/1 document; may be incomplete, must be a JSON object. */
  document: Record<string, unknown>;
}

export interface DraftSummary {
  draftId: number;
  /** The meter the draft is for, once one is chosen. */
  meterAssetId: string | null;
  /** The check date typed so far, if any. */
  date: string | null;
  /** Points with at least one reading typed, out of all points. */
  pointsStarted: number;
  pointCount: number;
  createdAt: string;
  updatedAt: string;
}

export interface Draft extends DraftSummary {
  document: Record<string, unknown>;
}

export interface DraftsApi {
  /** Creates a draft (no draftId) or replaces one's document; returns its summary. */
  saveDraft(input: DraftInput): Promise<DraftSummary>;
  getDraft(draftId: number): Promise<Draft>;
  /** Newest first. */
  listDrafts(): Promise<DraftSummary[]>;
  /** Removes a draft (after it was recorded, or when the technician drops it). */
  discardDraft(draftId: number): Promise<{ draftId: number }>;
}

export const DRAFTS_OPERATIONS = {
  saveDraft: 'write',
  getDraft: 'read',
  listDrafts: 'read',
  discardDraft: 'write',
} as const satisfies Record<keyof DraftsApi, 'read' | 'write'>;
