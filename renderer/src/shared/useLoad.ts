// Loading data through the lab client: one shape for "loading / failed / ready" in every view,
// and a reload after writes.
import { useCallback, useEffect, useState } from 'react';

export type Load<T> = { kind: 'loading' } | { kind: 'failed'; message: string } | { kind: 'ready'; value: T };

export function messageOf(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}

export function useLoad<T>(fetcher: () => Promise<T>, deps: readonly unknown[]): [Load<T>, () => void] {
  const [load, setLoad] = useState<Load<T>>({ kind: 'loading' });
  const [generation, setGeneration] = useState(0);
  const reload = useCallback(() => setGeneration((g) => g + 1), []);
  useEffect(() => {
    let live = true;
    fetcher()
      .then((value) => live && setLoad({ kind: 'ready', value }))
      .catch((e: unknown) => live && setLoad({ kind: 'failed', message: messageOf(e) }));
    return () => {
      live = false;
    };
    // The caller lists what the fetcher depends on, as with useEffect; the lint rule checks
    // those lists at each call (additionalHooks), so this generic effect is the one exception.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [...deps, generation]);
  return [load, reload];
}
