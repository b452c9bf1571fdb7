// The record form's draft, saved as it is typed: a quiet moment after the last change saves the
// exchange document, leaving a box saves at once (the window may close right after the last
// keystroke), and nothing is saved until the technician typed something.
import { useCallback, useEffect, useRef, useState } from 'react';
import { useLab } from '../lab/LabContext';
import { href } from '../shared/routes';
import { messageOf } from '../shared/useLoad';

export type SaveState =
  | { kind: 'none' }
  | { kind: 'saving' }
  | { kind: 'saved'; at: string; draftId: number }
  | { kind: 'failed'; message: string };

const QUIET_MS = 400;

export interface DraftAutosave {
  save: SaveState;
  /** A failure beside the draft's own (e.g. the meter could not be read), shown in the same bar. */
  fail: (message: string) => void;
  /** Marks the form as typed in: from now on each change is saved. */
  touch: () => void;
  /** Saves what is pending now (on leaving a box). */
  flush: () => void;
  /** Stops saving, waits for the save under way and removes the draft (after recording or discarding). */
  finish: () => Promise<void>;
}

export function useDraftAutosave(draftText: string, initialDraftId: number | undefined): DraftAutosave {
  const api = useLab();
  const [save, setSave] = useState<SaveState>(
    initialDraftId ? { kind: 'saved', at: '', draftId: initialDraftId } : { kind: 'none' },
  );
  const draftIdRef = useRef<number | undefined>(initialDraftId);
  const dirtyRef = useRef(false);
  const finishedRef = useRef(false);
  const savingRef = useRef<Promise<void>>(Promise.resolve());
  const pendingText = useRef<string | null>(null);

  const saveNow = useCallback(() => {
    const text = pendingText.current;
    if (text === null || finishedRef.current) return;
    pendingText.current = null;
    setSave({ kind: 'saving' });
    // One save at a time, so the first save's draft number is known before the next.
    savingRef.current = savingRef.current.then(async () => {
      if (finishedRef.current) return;
      try {
        const s = await api.saveDraft({
          draftId: draftIdRef.current,
          document: JSON.parse(text) as Record<string, unknown>,
        });
        if (draftIdRef.current === undefined) {
          // Reopening the window at this address brings the draft back; no reload now.
          window.history.replaceState(null, '', href.draft(s.draftId));
        }
        draftIdRef.current = s.draftId;
        setSave({ kind: 'saved', at: s.updatedAt, draftId: s.draftId });
      } catch (e) {
        setSave({ kind: 'failed', message: messageOf(e) });
      }
    });
  }, [api]);

  useEffect(() => {
    if (!dirtyRef.current) return;
    pendingText.current = draftText;
    const timer = setTimeout(saveNow, QUIET_MS);
    return () => clearTimeout(timer);
  }, [draftText, saveNow]);

  const flush = useCallback(() => {
    if (pendingText.current !== null) saveNow();
  }, [saveNow]);

  const touch = useCallback(() => {
    dirtyRef.current = true;
  }, []);

  const fail = useCallback((message: string) => setSave({ kind: 'failed', message }), []);

  const finish = useCallback(async () => {
    finishedRef.current = true;
    await savingRef.current;
    const id = draftIdRef.current;
    if (id !== undefined) await api.discardDraft(id).catch(() => undefined);
  }, [api]);

  return { save, fail, touch, flush, finish };
}
