// The points of a check by the sweep method: at each plan point the dial is set to a graduation and
// the source is swept across the dip; the trace file (Touchstone or delimited) is attached here and
// fitted at once, with the fitted dip drawn over the trace, and judged live (air and thermal
// corrections, the fit's u(f0) in the budget) exactly as recording will judge it.
import { useEffect, useId, useRef, useState } from 'react';
import type { TraceFit } from '../../../app/api/contract-sweep';
import type { PointResult } from '../../../app/engine/model';

type ModelChoice = 'auto' | 'complex' | 'magnitude';
import { sweptBudgetDocument, sweptReadyToJudge } from './checkForm';
import type { CheckForm, FormPoint } from './checkForm';
import { DipChart } from '../charts/DipChart';
import { VERDICT_LABEL, formatHz, formatPpm } from '../shared/format';
import { messageOf } from '../shared/useLoad';
import { useLab } from '../lab/LabContext';

type FitState = { kind: 'fitting' } | { kind: 'ok'; fit: TraceFit } | { kind: 'failed'; message: string };
type Judgement =
  { kind: 'judging' } | { kind: 'ok'; result: PointResult } | { kind: 'failed'; message: string };

/** Trace files are text; a bigger file is surely not a sweep (a 10,001-point .s2p is about 1 MB). */
const MAX_TRACE_BYTES = 8 * 1024 * 1024;

export function SweptPoints({
  form,
  unit,
  edit,
}: {
  form: CheckForm;
  unit: string;
  edit: (change: (f: CheckForm) => CheckForm) => void;
}) {
  const api = useLab();
  const [fits, setFits] = useState<Record<number, { text: string; state: FitState }>>({});
  const fitsRef = useRef(fits);
  fitsRef.current = fits;
  const setPoint = (i: number, change: (p: FormPoint) => FormPoint) =>
    edit((f) => ({ ...f, points: f.points.map((p, j) => (j === i ? change(p) : p)) }));

  // Each attached trace is fitted once per content, also after a draft is reopened.
  // Keyed on the text and the model asked for, so a change of model fits again.
  const tracesKey = JSON.stringify(
    form.points.map((p) => [
      p.sweep ? `${p.sweep.model ?? 'auto'}\u0002${p.sweep.text}` : '',
      p.sweep?.name ?? '',
      p.sweep?.model ?? null,
    ]),
  );
  useEffect(() => {
    (JSON.parse(tracesKey) as [string, string, ModelChoice | null][]).forEach(([text, name, model], i) => {
      if (!text || fitsRef.current[i]?.text === text) return;
      setFits((m) => ({ ...m, [i]: { text, state: { kind: 'fitting' } } }));
      api
        .fitTrace({ text: text.slice(text.indexOf('\u0002') + 1), name, model: model ?? undefined })
        .then((fit) =>
          setFits((m) => (m[i]?.text === text ? { ...m, [i]: { text, state: { kind: 'ok', fit } } } : m)),
        )
        .catch((e: unknown) =>
          setFits((m) =>
            m[i]?.text === text
              ? { ...m, [i]: { text, state: { kind: 'failed', message: messageOf(e) } } }
              : m,
          ),
        );
    });
    // Keyed on the trace texts themselves.
  }, [api, tracesKey]);

  // Each swept point is judged live once it has what the budget needs, as recording would judge it.
  const [judged, setJudged] = useState<Record<number, { key: string; state: Judgement }>>({});
  const judgedRef = useRef(judged);
  judgedRef.current = judged;
  const judgeKeys = form.points.map((p) =>
    sweptReadyToJudge(form, p) ? JSON.stringify(sweptBudgetDocument(form, p, unit)) : '',
  );
  const judgeSignature = JSON.stringify(judgeKeys);
  useEffect(() => {
    const timer = setTimeout(() => {
      (JSON.parse(judgeSignature) as string[]).forEach((key, i) => {
        if (!key || judgedRef.current[i]?.key === key) return;
        setJudged((m) => ({ ...m, [i]: { key, state: { kind: 'judging' } } }));
        api
          .evaluateBudget(JSON.parse(key) as never)
          .then((result) =>
            setJudged((m) => (m[i]?.key === key ? { ...m, [i]: { key, state: { kind: 'ok', result } } } : m)),
          )
          .catch((e: unknown) =>
            setJudged((m) =>
              m[i]?.key === key
                ? { ...m, [i]: { key, state: { kind: 'failed', message: messageOf(e) } } }
                : m,
            ),
          );
      });
    }, 300);
    return () => clearTimeout(timer);
    // Keyed on the budget documents themselves.
  }, [api, judgeSignature]);

  async function attach(i: number, file: File | undefined) {
    if (!file) return;
    if (file.size > MAX_TRACE_BYTES) {
      setFits((m) => ({
        ...m,
        [i]: {
          text: '',
          state: { kind: 'failed', message: `${file.name} is larger than 8 MB: not a trace` },
        },
      }));
      return;
    }
    const text = await file.text();
    setPoint(i, (p) => ({ ...p, sweep: { name: file.name, text } }));
  }

  return (
    <ol className="swept-points plain" data-testid="swept-points">
      {form.points.map((p, i) => {
        const f = p.sweep ? fits[i] : undefined;
        return (
          <SweptPoint
            key={i}
            index={i}
            point={p}
            unit={unit}
            fit={
              f && f.text === (p.sweep ? `${p.sweep.model ?? 'auto'}\u0002${p.sweep.text}` : '')
                ? f.state
                : undefined
            }
            judged={judgeKeys[i] && judged[i]?.key === judgeKeys[i] ? judged[i]?.state : undefined}
            onDial={(v) => setPoint(i, (q) => ({ ...q, dialSetting: v }))}
            onFile={(file) => void attach(i, file)}
            onRemove={() => setPoint(i, (q) => ({ ...q, sweep: undefined }))}
            onModel={(model) => setPoint(i, (q) => (q.sweep ? { ...q, sweep: { ...q.sweep, model } } : q))}
          />
        );
      })}
    </ol>
  );
}

function SweptPoint(props: {
  index: number;
  point: FormPoint;
  unit: string;
  fit: FitState | undefined;
  judged: Judgement | undefined;
  onDial: (v: string) => void;
  onFile: (f: File | undefined) => void;
  onRemove: () => void;
  onModel: (model: 'auto' | 'complex' | 'magnitude') => void;
}) {
  const { index, point, unit, fit, judged, onDial, onFile, onRemove, onModel } = props;
  const dialId = useId();
  const modelId = useId();
  const fileId = useId();
  const label = `point ${index + 1} (${point.reference || 'no plan frequency'})`;
  const dialHz =
    unit === 'GHz' && Number.isFinite(Number(point.dialSetting)) ? Number(point.dialSetting) * 1e9 : null;
  return (
    <li className="swept-point" data-point={index}>
      <div className="row">
        <strong className="swept-label">
          {index + 1}. {point.phase}
        </strong>
        <div className="field">
          <label htmlFor={dialId}>
            {label}, dial set to / {unit}
          </label>
          <input
            id={dialId}
            type="text"
            inputMode="decimal"
            className="num-input dial-input"
            value={point.dialSetting ?? ''}
            onChange={(e) => onDial(e.target.value)}
          />
        </div>
        <div className="field">
          <label htmlFor={fileId}>{label}, swept trace (.s1p, .s2p, .csv, .txt)</label>
          <input
            id={fileId}
            type="file"
            accept=".s1p,.s2p,.csv,.txt,.dat,text/plain,text/csv"
            onChange={(e) => onFile(e.target.files?.[0])}
          />
        </div>
        {point.sweep && (
          <div className="field">
            <label htmlFor={modelId}>{label}, resonance model</label>
            <select
              id={modelId}
              value={point.sweep.model ?? 'auto'}
              onChange={(e) => onModel(e.target.value as 'auto' | 'complex' | 'magnitude')}
            >
              <option value="auto">chosen from the data</option>
              <option value="complex">complex Q-circle</option>
              <option value="magnitude">magnitude dip</option>
            </select>
          </div>
        )}
        {point.sweep && (
          <button type="button" className="button small" onClick={onRemove}>
            Detach {point.sweep.name}
          </button>
        )}
      </div>
      {!point.sweep && <p className="muted">No trace attached yet.</p>}
      {point.sweep && fit?.kind === 'fitting' && <p className="status">Fitting {point.sweep.name}…</p>}
      {point.sweep && fit?.kind === 'failed' && (
        <p className="status error" role="alert">
          <span aria-hidden="true">✗ </span>
          {fit.message}
        </p>
      )}
      {point.sweep && fit?.kind === 'ok' && (
        <>
          <p className="swept-result" data-testid="swept-result">
            <span aria-hidden="true">✓ </span>
            {point.sweep.name}: resonance at <strong>{formatHz(fit.fit.report.main.f0Hz, 6)}</strong>, loaded
            Q {Math.round(fit.fit.report.main.loadedQ)}, dip {fit.fit.report.main.depthDb.toFixed(2)} dB
            {dialHz !== null && (
              <>
                {' '}
                · dial − f0 ={' '}
                {formatPpm(((dialHz - fit.fit.report.main.f0Hz) / fit.fit.report.main.f0Hz) * 1e6)} before
                corrections
              </>
            )}
          </p>
          {fit.fit.report.model && (
            <p className="muted" data-testid="swept-model">
              Model: {fit.fit.report.model.used === 'complex' ? 'complex Q-circle' : 'magnitude dip'} (
              {fit.fit.report.model.reason})
            </p>
          )}
          {fit.fit.warnings.map((w) => (
            <p key={w} className="status error" role="alert">
              <span aria-hidden="true">⚠ </span>
              {w}
            </p>
          ))}
          <SweptVerdict judged={judged} />
          <DipChart fit={fit.fit} name={point.sweep.name} />
        </>
      )}
    </li>
  );
}

function SweptVerdict({ judged }: { judged: Judgement | undefined }) {
  if (!judged)
    return <p className="muted">Type the bench conditions and choose a standard to see the verdict.</p>;
  if (judged.kind === 'judging') return <p className="status">Judging…</p>;
  if (judged.kind === 'failed')
    return (
      <p className="status error" role="alert">
        <span aria-hidden="true">✗ </span>
        {judged.message}
      </p>
    );
  const r = judged.result;
  const v = VERDICT_LABEL[r.decision.verdict];
  return (
    <p className="swept-verdict" data-testid="swept-verdict">
      Error {formatPpm(r.errorPpm)} after corrections, U = {r.expandedPpm.toFixed(1)} ppm (k ={' '}
      {r.budget.coverageFactor.toFixed(2)}):{' '}
      <strong className={`verdict v-${r.decision.verdict}`}>
        {v.symbol} {v.word}
      </strong>
    </p>
  );
}
