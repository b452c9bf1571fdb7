// Recording a check, guided and keyboard-first: the meter, the standards used (those without a
// valid certificate on the date shown unavailable and why), the bench conditions, the points of
// the meter's plan with readings in both directions, each judged live as it is typed, then
// recorded. The exchange document is saved as a draft as it is typed: closing the window loses
// nothing, and the draft reopens from the register's "Record a check" view.
import { format as formatDate } from 'date-fns';
import { useCallback, useEffect, useId, useMemo, useRef, useState } from 'react';
import type { LabApi, LabSettings, Meter, Person, RegisterRow, Standard } from '../../app/api/contract';
import type { DraftSummary } from '../../app/api/contract-drafts';
import type { FieldIssue } from '../../app/api/errors';
import type { CheckDocumentInput } from '../../app/api/schemas';
import type { PointResult } from '../../app/engine/model';
import { Cautions } from './Cautions';
import { SweptPoints } from './SweptPoints';
import {
  DEFAULT_READINGS_PER_DIRECTION,
  anyReadingTyped,
  availabilityOn,
  blankPoint,
  budgetDocument,
  emptyForm,
  fromDocument,
  pointsFromPlan,
  readingText,
  readingUnit,
  readyToJudge,
  toDocument,
} from './checkForm';
import type { CheckForm, FormPoint } from './checkForm';
import { STATE_LABEL, VERDICT_LABEL, formatBand, formatPower, formatPpm } from './format';
import { href } from './routes';
import { messageOf, useLoad } from './useLoad';

interface Setup {
  lab: LabSettings;
  meters: RegisterRow[];
  standards: Standard[];
  people: Person[];
  drafts: DraftSummary[];
  initial: CheckForm;
  meter: Meter | null;
  draftId: number | undefined;
}

const ISO_DATE = /^\d{4}-\d{2}-\d{2}$/;

function localToday(): string {
  return formatDate(new Date(), 'yyyy-MM-dd');
}

async function loadSetup(
  api: LabApi,
  assetId: string | undefined,
  draftId: number | undefined,
): Promise<Setup> {
  const [lab, meters, standards, people, drafts] = await Promise.all([
    api.getLab(),
    api.listMeters(),
    api.listStandards(),
    api.listPeople(),
    api.listDrafts(),
  ]);
  const today = localToday();
  if (draftId !== undefined) {
    const draft = await api.getDraft(draftId);
    const meterId = typeof draft.document.meter === 'string' ? draft.document.meter : '';
    const meter = meterId
      ? await api.getMeter(meterId).then(
          (d) => d.meter,
          () => null,
        )
      : null;
    const initial = fromDocument(draft.document, readingUnit(meter ?? undefined), today);
    return { lab, meters, standards, people, drafts, initial, meter, draftId };
  }
  const initial = emptyForm(today);
  let meter: Meter | null = null;
  if (assetId) {
    meter = (await api.getMeter(assetId)).meter;
    initial.meter = meter.assetId;
    initial.points = pointsFromPlan(meter);
  }
  return { lab, meters, standards, people, drafts, initial, meter, draftId: undefined };
}

export function RecordCheckPage({
  api,
  assetId,
  draftId,
}: {
  api: LabApi;
  assetId?: string;
  draftId?: number;
}) {
  const [load] = useLoad(() => loadSetup(api, assetId, draftId), [api, assetId, draftId]);
  useEffect(() => {
    document.title = 'Record a check · Dipledger';
  }, []);
  return (
    <div className="page record-page">
      <header className="masthead">
        <h1>Record a check</h1>
        <p className="subtitle">Each point is judged as you type; the check is saved as a draft as you go.</p>
      </header>
      {load.kind === 'loading' && <p className="status">Loading…</p>}
      {load.kind === 'failed' && (
        <p className="status error" role="alert">
          The form could not be opened: {load.message}
        </p>
      )}
      {load.kind === 'ready' && <CheckEditor api={api} setup={load.value} />}
    </div>
  );
}

type SaveState =
  | { kind: 'none' }
  | { kind: 'saving' }
  | { kind: 'saved'; at: string; draftId: number }
  | { kind: 'failed'; message: string };

type Judged =
  | { key: string; kind: 'pending' }
  | { key: string; kind: 'ok'; result: PointResult }
  | { key: string; kind: 'error'; message: string };

type RecordState =
  { kind: 'idle' } | { kind: 'busy' } | { kind: 'failed'; message: string; issues: FieldIssue[] };

function CheckEditor({ api, setup }: { api: LabApi; setup: Setup }) {
  const [form, setForm] = useState<CheckForm>(setup.initial);
  const [meter, setMeter] = useState<Meter | null>(setup.meter);
  const [save, setSave] = useState<SaveState>(
    setup.draftId ? { kind: 'saved', at: '', draftId: setup.draftId } : { kind: 'none' },
  );
  const [judged, setJudged] = useState<Record<number, Judged>>({});
  const [recordState, setRecordState] = useState<RecordState>({ kind: 'idle' });
  const [drafts, setDrafts] = useState(setup.drafts.filter((d) => d.draftId !== setup.draftId));
  const draftIdRef = useRef<number | undefined>(setup.draftId);
  const dirtyRef = useRef(false);
  const recordedRef = useRef(false);
  const savingRef = useRef<Promise<void>>(Promise.resolve());
  const unit = readingUnit(meter ?? undefined);

  /** Every edit goes through here, so a draft is saved only once the technician typed something. */
  const edit = useCallback((change: (f: CheckForm) => CheckForm) => {
    dirtyRef.current = true;
    setForm(change);
  }, []);

  // --- the draft, saved as it is typed -------------------------------------------------------
  const draftText = JSON.stringify(toDocument(form, unit, 'draft'));
  const pendingText = useRef<string | null>(null);
  const saveNow = useCallback(() => {
    const text = pendingText.current;
    if (text === null || recordedRef.current) return;
    pendingText.current = null;
    setSave({ kind: 'saving' });
    // One save at a time, so the first save's draft number is known before the next.
    savingRef.current = savingRef.current.then(async () => {
      if (recordedRef.current) return;
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
    const timer = setTimeout(saveNow, 400);
    return () => clearTimeout(timer);
  }, [draftText, saveNow]);

  // Leaving a box saves at once: the window may be closed right after the last keystroke.
  const flush = useCallback(() => {
    if (pendingText.current !== null) saveNow();
  }, [saveNow]);

  // --- the meter ------------------------------------------------------------------------------
  async function chooseMeter(assetId: string) {
    edit((f) => ({ ...f, meter: assetId }));
    if (!assetId) {
      setMeter(null);
      return;
    }
    try {
      const m = (await api.getMeter(assetId)).meter;
      setMeter(m);
      // Typed readings are never thrown away by a change of meter.
      edit((f) => (anyReadingTyped(f) ? f : { ...f, points: pointsFromPlan(m, perDirection(f)) }));
    } catch (e) {
      setMeter(null);
      setSave({ kind: 'failed', message: messageOf(e) });
    }
  }

  // --- live judgement of each point -----------------------------------------------------------
  const keys = form.points.map((p) =>
    readyToJudge(form, p) ? JSON.stringify(budgetDocument(form, p, unit)) : '',
  );
  const keySignature = keys.join('\n');
  const judgedRef = useRef(judged);
  judgedRef.current = judged;
  useEffect(() => {
    const timer = setTimeout(() => {
      keySignature.split('\n').forEach((key, i) => {
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
    }, 200);
    return () => clearTimeout(timer);
  }, [api, keySignature]);

  const judgedNow = (i: number): Judged | undefined => {
    const j = judged[i];
    return j && keys[i] && j.key === keys[i] ? j : undefined;
  };

  // --- recording ------------------------------------------------------------------------------
  async function record() {
    setRecordState({ kind: 'busy' });
    try {
      const rec = await api.recordCheck(toDocument(form, unit, 'record') as unknown as CheckDocumentInput);
      recordedRef.current = true;
      await savingRef.current;
      const id = draftIdRef.current;
      if (id !== undefined) await api.discardDraft(id).catch(() => undefined);
      // Signing and issuing follow on the check's own page.
      window.location.hash = href.check(rec.checkId);
    } catch (e) {
      const issues = (e as { issues?: FieldIssue[] }).issues ?? [];
      setRecordState({ kind: 'failed', message: messageOf(e), issues });
    }
  }

  async function discard() {
    recordedRef.current = true;
    await savingRef.current;
    const id = draftIdRef.current;
    if (id !== undefined) await api.discardDraft(id).catch(() => undefined);
    window.location.hash = href.register();
  }

  const meterSelectId = useId();
  const meterRows = setup.meters.filter((m) => m.state !== 'withdrawn' || m.assetId === form.meter);
  const verdicts = form.points
    .map((_, i) => judgedNow(i))
    .filter((j): j is Extract<Judged, { kind: 'ok' }> => j?.kind === 'ok');

  return (
    <form
      className="check-form"
      onSubmit={(e) => {
        e.preventDefault();
        void record();
      }}
      onBlur={flush}
      noValidate
      aria-label="Check being recorded"
    >
      <DraftBar save={save} onDiscard={() => void discard()} />
      {drafts.length > 0 && form.meter === '' && (
        <DraftList
          drafts={drafts}
          api={api}
          onGone={(id) => setDrafts((d) => d.filter((x) => x.draftId !== id))}
        />
      )}

      <fieldset className="step">
        <legend>
          <span className="step-no">1</span> Meter, date and who
        </legend>
        <div className="row">
          <div className="field">
            <label htmlFor={meterSelectId}>Meter</label>
            <select
              id={meterSelectId}
              value={form.meter}
              onChange={(e) => void chooseMeter(e.target.value)}
              autoFocus={form.meter === ''}
              required
            >
              <option value="">Choose a meter…</option>
              {meterRows.map((m) => (
                <option key={m.assetId} value={m.assetId}>
                  {m.assetId} · {formatBand(m.minHz, m.maxHz)} · {STATE_LABEL[m.state].word}
                </option>
              ))}
            </select>
          </div>
          <label className="field">
            <span>Date of the check (YYYY-MM-DD)</span>
            <input
              type="text"
              className="date-input"
              inputMode="numeric"
              placeholder="YYYY-MM-DD"
              aria-invalid={!ISO_DATE.test(form.date)}
              value={form.date}
              onChange={(e) => edit((f) => ({ ...f, date: e.target.value.trim() }))}
            />
          </label>
          {!ISO_DATE.test(form.date) && (
            <p className="field-problem" role="status">
              <span aria-hidden="true">✗ </span>write the date as YYYY-MM-DD, e.g. {localToday()}
            </p>
          )}
          <label className="field">
            <span>Performed by</span>
            <select
              value={form.performer}
              onChange={(e) => edit((f) => ({ ...f, performer: e.target.value }))}
              required
            >
              <option value="">Choose…</option>
              {setup.people.map((p) => (
                <option key={p.id} value={p.name}>
                  {p.name} ({p.role})
                </option>
              ))}
            </select>
          </label>
        </div>
        {meter && (
          <p className="meter-brief" data-testid="meter-brief">
            <strong>{meter.assetId}</strong> {meter.description} · band {formatBand(meter.minHz, meter.maxHz)}{' '}
            · readings in {unit === 'GHz' ? 'GHz (direct-reading dial)' : 'divisions of the micrometer'} ·{' '}
            <span className="power-inline">
              <span aria-hidden="true">⚠ </span>max input {formatPower(meter.maxInputPowerW)}
            </span>
            {meter.state === 'quarantined' && <span className="warn-inline"> · ◆ quarantined</span>}
          </p>
        )}
      </fieldset>

      <fieldset className="step">
        <legend>
          <span className="step-no">2</span> Lab standards used
        </legend>
        <ul className="standards-pick">
          {setup.standards.map((s) => {
            const a = availabilityOn(s, form.date);
            const picked = form.standards.includes(s.assetId);
            return (
              <li
                key={s.assetId}
                className={a.available ? 'std-ok' : 'std-unavailable'}
                data-standard={s.assetId}
              >
                <label>
                  <input
                    type="checkbox"
                    checked={picked}
                    disabled={!a.available && !picked}
                    onChange={(e) =>
                      edit((f) => ({
                        ...f,
                        standards: e.target.checked
                          ? [...f.standards, s.assetId]
                          : f.standards.filter((x) => x !== s.assetId),
                      }))
                    }
                  />{' '}
                  <strong>{s.assetId}</strong> <span className="muted">{s.description}</span>
                </label>
                <span className="std-status">
                  {a.available ? (
                    <>
                      <span aria-hidden="true">✓ </span>certificate {a.certificate?.certificateId}, due{' '}
                      {a.certificate?.dueOn}, U = {a.certificate?.expandedUncertaintyPpm} ppm (k ={' '}
                      {a.certificate?.coverageFactor})
                    </>
                  ) : (
                    <strong>
                      <span aria-hidden="true">✗ </span>unavailable on {form.date}: {a.reason}
                      {picked ? ' — remove it or change the date' : ''}
                    </strong>
                  )}
                </span>
              </li>
            );
          })}
        </ul>
      </fieldset>

      <fieldset className="step">
        <legend>
          <span className="step-no">3</span> Bench conditions
        </legend>
        <div className="row">
          <NumberField
            label="Temperature"
            unit="°C"
            value={form.temperatureC}
            onChange={(v) => edit((f) => ({ ...f, temperatureC: v }))}
          />
          <NumberField
            label="Pressure"
            unit="hPa"
            value={form.pressureHpa}
            onChange={(v) => edit((f) => ({ ...f, pressureHpa: v }))}
          />
          <NumberField
            label="Relative humidity"
            unit="%RH"
            value={form.humidityPct}
            onChange={(v) => edit((f) => ({ ...f, humidityPct: v }))}
          />
        </div>
        <p className="hint">
          Standard uncertainties: the lab’s defaults ({setup.lab.defaultTemperatureUncertaintyC} °C,{' '}
          {setup.lab.defaultPressureUncertaintyHpa} hPa, {setup.lab.defaultHumidityUncertaintyPct} %RH).
        </p>
      </fieldset>

      <fieldset className="step">
        <legend>
          <span className="step-no">4</span> Points and readings
        </legend>
        <div className="row method-pick" role="radiogroup" aria-label="How the points were found">
          <label className="choice">
            <input
              type="radio"
              name="method"
              checked={form.method === 'tune-to-dip'}
              onChange={() => edit((f) => ({ ...f, method: 'tune-to-dip' }))}
            />{' '}
            Tuned to the dip (readings in both directions)
          </label>
          <label className="choice">
            <input
              type="radio"
              name="method"
              checked={form.method === 'sweep'}
              onChange={() =>
                edit((f) => ({
                  ...f,
                  method: 'sweep',
                  // The dial is set to the plan frequency unless something else was typed.
                  points: f.points.map((p) => ({
                    ...p,
                    dialSetting: p.dialSetting ?? (unit === 'GHz' ? readingText(p.reference, unit) : ''),
                  })),
                }))
              }
            />{' '}
            Swept (dial set, source swept across the dip, trace attached)
          </label>
        </div>
        {form.meter === '' ? (
          <p className="muted">Choose a meter first: its check plan fills the points.</p>
        ) : form.method === 'sweep' ? (
          <SweptPoints api={api} form={form} unit={unit} edit={edit} />
        ) : (
          <PointsTable form={form} unit={unit} edit={edit} judged={judgedNow} meter={meter} />
        )}
      </fieldset>

      <fieldset className="step">
        <legend>
          <span className="step-no">5</span> Review and record
        </legend>
        <label className="field wide">
          <span>Remarks (optional)</span>
          <input
            type="text"
            value={form.remarks}
            onChange={(e) => edit((f) => ({ ...f, remarks: e.target.value }))}
          />
        </label>
        <Review form={form} verdicts={verdicts.map((v) => v.result)} lab={setup.lab} />
        <div className="actions">
          <button type="submit" className="button primary" disabled={recordState.kind === 'busy'}>
            {recordState.kind === 'busy' ? 'Recording…' : 'Record the check'}
          </button>
        </div>
        {recordState.kind === 'failed' && <RecordProblems state={recordState} />}
      </fieldset>
      <Cautions />
    </form>
  );
}

function perDirection(f: CheckForm): number {
  return f.points[0]?.up.length ?? DEFAULT_READINGS_PER_DIRECTION;
}

function DraftBar({ save, onDiscard }: { save: SaveState; onDiscard: () => void }) {
  const text =
    save.kind === 'none'
      ? 'Not saved yet: the draft is kept from the first thing you type.'
      : save.kind === 'saving'
        ? 'Saving the draft…'
        : save.kind === 'saved'
          ? `✓ Draft ${save.draftId} saved${save.at ? ` at ${save.at.slice(11, 19)}` : ''}`
          : `✗ The draft was not saved: ${save.message}`;
  return (
    <div className={`draft-bar draft-${save.kind}`}>
      <p role="status" aria-live="polite" data-testid="draft-status">
        {text}
      </p>
      {save.kind === 'saved' && (
        <button type="button" className="link" onClick={onDiscard}>
          Discard this draft
        </button>
      )}
    </div>
  );
}

function DraftList({
  drafts,
  api,
  onGone,
}: {
  drafts: DraftSummary[];
  api: LabApi;
  onGone: (id: number) => void;
}) {
  return (
    <section className="drafts" aria-label="Unfinished drafts">
      <h2>Unfinished drafts</h2>
      <ul>
        {drafts.map((d) => (
          <li key={d.draftId} data-draft-id={d.draftId}>
            <a href={href.draft(d.draftId)}>
              Draft {d.draftId}: {d.meterAssetId ?? 'no meter yet'}
              {d.date ? `, ${d.date}` : ''}
            </a>{' '}
            <span className="muted">
              {d.pointsStarted} of {d.pointCount} points started · saved{' '}
              {d.updatedAt.slice(0, 16).replace('T', ' ')}
            </span>{' '}
            <button
              type="button"
              className="link"
              onClick={() => void api.discardDraft(d.draftId).then(() => onGone(d.draftId))}
            >
              Discard
            </button>
          </li>
        ))}
      </ul>
    </section>
  );
}

function NumberField({
  label,
  unit,
  value,
  onChange,
}: {
  label: string;
  unit: string;
  value: string;
  onChange: (v: string) => void;
}) {
  const id = useId();
  return (
    <div className="field">
      <label htmlFor={id}>
        {label} / {unit}
      </label>
      <span className="with-unit">
        <input
          id={id}
          type="text"
          inputMode="decimal"
          className="num-input"
          value={value}
          onChange={(e) => onChange(e.target.value)}
        />
        <span className="unit" aria-hidden="true">
          {unit}
        </span>
      </span>
    </div>
  );
}

/** Enter moves to the next box of the points table, as on a paper sheet read left to right. */
function nextOnEnter(e: React.KeyboardEvent<HTMLInputElement>) {
  if (e.key !== 'Enter') return;
  e.preventDefault();
  const boxes = Array.from(document.querySelectorAll<HTMLInputElement>('input[data-entry]'));
  const i = boxes.indexOf(e.currentTarget);
  boxes[i + 1]?.focus();
}

function PointsTable({
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

const RULE_WORDS: Record<LabSettings['decisionRule']['kind'], string> = {
  simple: 'simple acceptance (no guard band)',
  guarded: 'guarded acceptance',
  'guarded-fixed': 'guarded acceptance with a fixed guard band',
  'non-binary': 'non-binary (pass, conditional pass, conditional fail, fail)',
};

function Review({ form, verdicts, lab }: { form: CheckForm; verdicts: PointResult[]; lab: LabSettings }) {
  const counts = new Map<string, number>();
  for (const r of verdicts) counts.set(r.decision.verdict, (counts.get(r.decision.verdict) ?? 0) + 1);
  const rule = lab.decisionRule;
  return (
    <div className="review" data-testid="review">
      <p>
        {form.method === 'sweep'
          ? `${form.points.filter((p) => p.sweep).length} of ${form.points.length} points have a trace attached`
          : `${verdicts.length} of ${form.points.length} points judged`}
        {verdicts.length > 0 && ': '}
        {[...counts.entries()]
          .map(
            ([v, n]) =>
              `${n} ${VERDICT_LABEL[v as keyof typeof VERDICT_LABEL].symbol} ${VERDICT_LABEL[v as keyof typeof VERDICT_LABEL].word.toLowerCase()}`,
          )
          .join(', ')}
        .
      </p>
      <p className="hint">
        Decision rule: {RULE_WORDS[rule.kind]}
        {rule.kind === 'guarded' ? `, guard band ${rule.multipleOfU} × U` : ''}
        {rule.kind === 'guarded-fixed' ? `, guard band ${rule.guardBandPpm} ppm` : ''}. Live figures use each
        standard’s certificate valid today; the record uses the one valid on the check date. The verdicts
        support, and never replace, your lab’s quality system.
      </p>
    </div>
  );
}

function RecordProblems({ state }: { state: Extract<RecordState, { kind: 'failed' }> }) {
  const words = (field: string) =>
    field.replace(/^points\[(\d+)\]/, (_, n: string) => `Point ${Number(n) + 1}`);
  return (
    <div className="problems" role="alert">
      <p>
        <strong>
          <span aria-hidden="true">✗ </span>Not recorded; nothing was written.
        </strong>{' '}
        {state.issues.length === 0 ? state.message : 'Put these right and record again:'}
      </p>
      {state.issues.length > 0 && (
        <ul>
          {state.issues.map((i, k) => (
            <li key={k}>
              <strong>{words(i.field)}</strong>: {i.message.replace(`${i.field}: `, '')}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
