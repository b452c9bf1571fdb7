// The points table of a check tuned to the dip: readings up and down per point, the reference
// frequency, and each point's error, expanded uncertainty and verdict judged live.
import { useMemo } from 'react';
import type { Meter } from '../../../app/api/contract';
import { VERDICT_LABEL, formatPpm } from '../shared/format';
import { blankPoint, pointsFromPlan, readyToJudge } from './checkForm';
import type { CheckForm, FormPoint } from './checkForm';
import { perDirection } from './FormParts';
import type { Judged } from './useLiveJudgement';

/** Enter moves to the next box of the points table, as on a paper sheet read left to right. */
function nextOnEnter(e: React.KeyboardEvent<HTMLInputElement>) {
  if (e.key !== 'Enter') return;
  e.preventDefault();
  const boxes = Array.from(document.querySelectorAll<HTMLInputElement>('input[data-entry]'));
  const i = boxes.indexOf(e.currentTarget);
  boxes[i + 1]?.focus();
}

export function PointsTable({
  form,
  unit,
  edit,
  judged,
  meter,
}: {
  form: CheckForm;
  unit: string;
  edit: (change: (f: CheckForm) => CheckForm) => void;
  judged: (i: number) => Judged | undefined;
  meter: Meter | null;
}) {
  const n = perDirection(form);
  const setPoint = (i: number, change: (p: FormPoint) => FormPoint) =>
    edit((f) => ({ ...f, points: f.points.map((p, j) => (j === i ? change(p) : p)) }));
  const resize = (count: number) =>
    edit((f) => ({
      ...f,
      points: f.points.map((p) => ({
        ...p,
        up: Array.from({ length: count }, (_, k) => p.up[k] ?? ''),
        down: Array.from({ length: count }, (_, k) => p.down[k] ?? ''),
      })),
    }));
  const showStandard = form.standards.length > 1;
  const cols = useMemo(() => Array.from({ length: n }, (_, k) => k), [n]);

  return (
    <>
      <div className="row points-tools">
        <label className="field inline">
          <span>Readings per direction</span>
          <select value={n} onChange={(e) => resize(Number(e.target.value))}>
            {[2, 3, 4, 5].map((k) => (
              <option key={k} value={k}>
                {k}
              </option>
            ))}
          </select>
        </label>
        <label className="choice">
          <input
            type="checkbox"
            checked={form.adjusted}
            onChange={(e) =>
              edit((f) => {
                const found = f.points.filter((p) => p.phase === 'as-found');
                return e.target.checked
                  ? {
                      ...f,
                      adjusted: true,
                      points: [...found, ...found.map((p) => blankPoint(p.reference, 'as-left', n))],
                    }
                  : { ...f, adjusted: false, points: found };
              })
            }
          />{' '}
          The meter was adjusted (adds as-left points)
        </label>
        {meter && (
          <button
            type="button"
            className="link"
            onClick={() => edit((f) => ({ ...f, points: pointsFromPlan(meter, n) }))}
          >
            Refill the points from the plan ({meter.planHz.length})
          </button>
        )}
      </div>
      <div className="table-wrap">
        <table className="grid entry">
          <caption className="visually-hidden">
            Points: readings in {unit}, results computed as you type
          </caption>
          <thead>
            <tr>
              <th scope="col" className="num">
                #
              </th>
              <th scope="col">Reference</th>
              {showStandard && <th scope="col">Standard</th>}
              {cols.map((k) => (
                <th scope="col" key={`u${k}`} className="num">
                  ↑ up {k + 1} / {unit}
                </th>
              ))}
              {cols.map((k) => (
                <th scope="col" key={`d${k}`} className="num">
                  ↓ down {k + 1} / {unit}
                </th>
              ))}
              <th scope="col" className="num">
                Dip / dB
              </th>
              <th scope="col" className="num">
                Error
              </th>
              <th scope="col" className="num">
                U (k)
              </th>
              <th scope="col">Verdict</th>
              <th scope="col">
                <span className="visually-hidden">Remove</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {form.points.map((p, i) => {
              const j = judged(i);
              const name = `point ${i + 1} (${p.reference || 'no reference'}${p.phase === 'as-left' ? ', as left' : ''})`;
              return (
                <tr key={i} data-point={i} className={p.phase === 'as-left' ? 'as-left' : undefined}>
                  <td className="num">
                    {i + 1}
                    {p.phase === 'as-left' && <span className="phase-tag">left</span>}
                  </td>
                  <td>
                    <input
                      type="text"
                      className="ref-input"
                      data-field={`points[${i}].reference`}
                      aria-label={`Reference frequency of point ${i + 1}, with unit`}
                      value={p.reference}
                      onChange={(e) => setPoint(i, (q) => ({ ...q, reference: e.target.value }))}
                    />
                  </td>
                  {showStandard && (
                    <td>
                      <select
                        aria-label={`Standard for ${name}`}
                        value={p.standard}
                        onChange={(e) => setPoint(i, (q) => ({ ...q, standard: e.target.value }))}
                      >
                        <option value="">{form.standards[0]} (first)</option>
                        {form.standards.slice(1).map((s) => (
                          <option key={s} value={s}>
                            {s}
                          </option>
                        ))}
                      </select>
                    </td>
                  )}
                  {(['up', 'down'] as const).map((dir) =>
                    cols.map((k) => (
                      <td key={`${dir}${k}`} className="num">
                        <input
                          type="text"
                          inputMode="decimal"
                          className="num-input reading"
                          data-entry
                          data-field={dir === 'up' && k === 0 ? `points[${i}].readings` : undefined}
                          aria-label={`${name}, ${dir} reading ${k + 1} in ${unit}`}
                          value={p[dir][k] ?? ''}
                          onKeyDown={nextOnEnter}
                          onChange={(e) =>
                            setPoint(i, (q) => ({
                              ...q,
                              [dir]: q[dir].map((v, m) => (m === k ? e.target.value : v)),
                            }))
                          }
                        />
                      </td>
                    )),
                  )}
                  <td className="num">
                    <input
                      type="text"
                      inputMode="decimal"
                      className="num-input dip"
                      data-field={`points[${i}].dipDepthDb`}
                      data-entry
                      aria-label={`${name}, dip depth in dB`}
                      value={p.dipDepthDb}
                      onKeyDown={nextOnEnter}
                      onChange={(e) => setPoint(i, (q) => ({ ...q, dipDepthDb: e.target.value }))}
                    />
                  </td>
                  <ResultCells judged={j} ready={readyToJudge(form, p)} />
                  <td>
                    <button
                      type="button"
                      className="link"
                      aria-label={`Remove ${name}`}
                      onClick={() => edit((f) => ({ ...f, points: f.points.filter((_, m) => m !== i) }))}
                    >
                      ✕
                    </button>
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      {form.points.some((_, i) => judged(i)?.kind === 'error') && (
        <ul className="point-problems" aria-label="Problems with points">
          {form.points.map((p, i) => {
            const j = judged(i);
            return j?.kind === 'error' ? (
              <li key={i}>
                <span aria-hidden="true">✗ </span>Point {i + 1} ({p.reference}): {j.message}
              </li>
            ) : null;
          })}
        </ul>
      )}
      <div className="row">
        <button
          type="button"
          className="button"
          onClick={() => edit((f) => ({ ...f, points: [...f.points, blankPoint('', 'as-found', n)] }))}
        >
          Add a point
        </button>
        <span className="hint">
          Type readings in {unit}
          {unit === 'GHz' ? ' (or with another unit, e.g. 9300.4 MHz)' : ''}; Enter moves to the next box.
        </span>
      </div>
    </>
  );
}

function ResultCells({ judged, ready }: { judged: Judged | undefined; ready: boolean }) {
  if (!ready)
    return (
      <>
        <td className="num muted">—</td>
        <td className="num muted">—</td>
        <td className="muted">needs 2 readings</td>
      </>
    );
  if (!judged || judged.kind === 'pending')
    return (
      <>
        <td className="num muted">…</td>
        <td className="num muted">…</td>
        <td className="muted">judging…</td>
      </>
    );
  if (judged.kind === 'error')
    return (
      <>
        <td className="num muted">—</td>
        <td className="num muted">—</td>
        <td className="verdict-fail">
          <span aria-hidden="true">✗ </span>see below
        </td>
      </>
    );
  const r = judged.result;
  const v = VERDICT_LABEL[r.decision.verdict];
  return (
    <>
      <td className="num" data-testid="live-error">
        {formatPpm(r.errorPpm)}
      </td>
      <td className="num">
        ±{r.expandedPpm.toFixed(1)} ppm ({r.budget.coverageFactor.toFixed(2)})
      </td>
      <td className={`verdict verdict-${r.decision.verdict}`} data-testid="live-verdict">
        <span aria-hidden="true">{v.symbol}</span> {v.word}
      </td>
    </>
  );
}
