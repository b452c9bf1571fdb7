// Live judgement of the points being typed: each point's budget document (its key) is judged by
// the service a moment after it stops changing; a result counts only while its key is current.
import { useEffect, useRef, useState } from 'react';
import type { PointResult } from '../../../app/engine/model';
import { useLab } from '../lab/LabContext';
import { messageOf } from '../shared/useLoad';

export type Judged =
  | { key: string; kind: 'pending' }
  | { key: string; kind: 'ok'; result: PointResult }
  | { key: string; kind: 'error'; message: string };

const QUIET_MS = 200;

/** keys[i]: the budget document of point i as JSON, or '' while it is not ready to judge. */
export function useLiveJudgement(keys: readonly string[]): (i: number) => Judged | undefined {
  const api = useLab();
  const [judged, setJudged] = useState<Record<number, Judged>>({});
  const judgedRef = useRef(judged);
  judgedRef.current = judged;
  const keySignature = JSON.stringify(keys);
  useEffect(() => {
    const timer = setTimeout(() => {
      (JSON.parse(keySignature) as string[]).forEach((key, i) => {
        if (!key || judgedRef.current[i]?.key === key) return;
        setJudged((j) => ({ ...j, [i]: { key, kind: 'pending' } }));
        api
          .evaluateBudget(JSON.parse(key) as never)
          .then((result) =>
            setJudged((j) => (j[i]?.key === key ? { ...j, [i]: { key, kind: 'ok', result } } : j)),
          )
          .catch((e: unknown) =>
            setJudged((j) =>
              j[i]?.key === key ? { ...j, [i]: { key, kind: 'error', message: messageOf(e) } } : j,
            ),
          );
      });
    }, QUIET_MS);
    return () => clearTimeout(timer);
  }, [api, keySignature]);

  return (i: number) => {
    const j = judged[i];
    return j && keys[i] && j.key === keys[i] ? j : undefined;
  };
}
