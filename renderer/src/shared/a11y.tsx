// Focus and announcements for people on the keyboard or a screen reader: one polite live region
// for the whole window (it outlives a change of view, so "check 166 recorded" is heard on the
// check's page), the move of focus to a new view's heading, and marking the fields a refusal
// names (aria-invalid, aria-describedby to the message) with focus on the first of them.
import { createContext, useCallback, useContext, useEffect, useRef, useState } from 'react';
import type { ReactNode } from 'react';

type Announce = (message: string) => void;
const AnnounceContext = createContext<Announce>(() => undefined);

/** The function that says something in the window's polite live region. */
export function useAnnounce(): Announce {
  return useContext(AnnounceContext);
}

export function AnnounceProvider({ children }: { children: ReactNode }) {
  const [said, setSaid] = useState<{ text: string; n: number }>({ text: '', n: 0 });
  // Each message is a new node, so the same words said twice are announced twice.
  const announce = useCallback((text: string) => setSaid((s) => ({ text, n: s.n + 1 })), []);
  return (
    <AnnounceContext.Provider value={announce}>
      {children}
      <div
        className="visually-hidden"
        role="status"
        aria-live="polite"
        aria-atomic="true"
        data-testid="announcer"
      >
        {said.text && <span key={said.n}>{said.text}</span>}
      </div>
    </AnnounceContext.Provider>
  );
}

/** Focuses an element that is not a control (a heading, a message) without a Tab stop of its own. */
export function focusQuietly(el: HTMLElement | null | undefined): boolean {
  if (!el) return false;
  if (!el.hasAttribute('tabindex')) el.setAttribute('tabindex', '-1');
  el.focus();
  return el.ownerDocument.activeElement === el;
}

/** The heading of the view inside the window's main region. */
export function viewHeading(doc: Document): HTMLElement | null {
  return doc.querySelector<HTMLElement>('main h1');
}

/** How long after a change of view focus is kept on its heading while the view loads, ms. */
const SETTLE_MS = 4000;

/**
 * Moves focus to the new view's heading whenever `viewKey` changes (not on the first load, so the
 * skip link stays the first Tab stop), from wherever it was outside the view (the navigation bar,
 * a button that went with the old view). While the view loads its heading may be drawn anew;
 * focus follows it for a few seconds unless the person has moved on inside the view.
 */
export function useFocusOnViewChange(viewKey: string, doc: Document = document): void {
  // The key focus was last placed for: the first load counts as placed (and an effect run twice
  // for the same key, as React may do, moves nothing).
  const placed = useRef(viewKey);
  useEffect(() => {
    if (placed.current === viewKey) return;
    placed.current = viewKey;
    const main = doc.querySelector('main');
    let target: HTMLElement | null = null;
    const settle = () => {
      const active = doc.activeElement;
      // Focus moves unless the person has already gone on to something inside the new view.
      const lost =
        !active || active === doc.body || !active.isConnected || active === target || !main?.contains(active);
      const heading = viewHeading(doc);
      if (heading && lost && heading !== active) {
        if (focusQuietly(heading)) target = heading;
      }
    };
    settle();
    const Observer = doc.defaultView?.MutationObserver;
    const observer = main && Observer ? new Observer(settle) : null;
    observer?.observe(main as Node, { childList: true, subtree: true });
    const timer = setTimeout(() => observer?.disconnect(), SETTLE_MS);
    return () => {
      clearTimeout(timer);
      observer?.disconnect();
    };
  }, [viewKey, doc]);
}

export interface FieldProblem {
  /** The field path as the service names it (meter, date, points[2].up[0]...). */
  field: string;
  /** The id of the element that says what is wrong with it. */
  messageId: string;
}

/**
 * The control for a field path inside `root`: the element whose data-field is the path, or the
 * nearest one for a path prefix (points[2].up[0] → points[2].up → points[2]).
 */
export function controlFor(root: ParentNode, field: string): HTMLElement | null {
  let path = field;
  for (;;) {
    const el = root.querySelector<HTMLElement>(`[data-field="${CSS.escape(path)}"]`);
    if (el) return el;
    const cut = Math.max(path.lastIndexOf('.'), path.lastIndexOf('['));
    if (cut <= 0) return null;
    path = path.slice(0, cut);
  }
}

/**
 * Marks the controls a refusal names as invalid, points each at its message, and focuses the first
 * one in the order of the form (or `fallback` when no named field is on the form). Returns the
 * function that takes the marks off again.
 */
export function markProblems(root: HTMLElement, problems: FieldProblem[], fallback?: HTMLElement | null) {
  const marked = new Map<HTMLElement, string[]>();
  for (const p of problems) {
    const el = controlFor(root, p.field);
    if (!el) continue;
    marked.set(el, [...(marked.get(el) ?? []), p.messageId]);
  }
  const undo: (() => void)[] = [];
  for (const [el, ids] of marked) {
    const before = {
      invalid: el.getAttribute('aria-invalid'),
      described: el.getAttribute('aria-describedby'),
    };
    el.setAttribute('aria-invalid', 'true');
    el.setAttribute('aria-describedby', [before.described, ...ids].filter(Boolean).join(' '));
    undo.push(() => {
      if (before.invalid === null) el.removeAttribute('aria-invalid');
      else el.setAttribute('aria-invalid', before.invalid);
      if (before.described === null) el.removeAttribute('aria-describedby');
      else el.setAttribute('aria-describedby', before.described);
    });
  }
  const inOrder = [...marked.keys()].sort((a, b) =>
    a.compareDocumentPosition(b) & Node.DOCUMENT_POSITION_FOLLOWING ? -1 : 1,
  );
  if (inOrder[0]) inOrder[0].focus();
  else focusQuietly(fallback);
  return () => undo.forEach((u) => u());
}
