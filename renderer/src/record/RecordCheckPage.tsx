// Recording a check, guided and keyboard-first: the meter, the standards used (those without a
// valid certificate on the date shown unavailable and why), the bench conditions, the points of
// the meter's plan with readings in both directions, each judged live as it is typed, then
// recorded. The exchange document is saved as a draft as it is typed: closing the window loses
// nothing, and the draft reopens from the register's "Record a check" view.
import { format as formatDate } from 'date-fns';
import { useCallback, useEffect, useId, useRef, useState } from 'react';
import type { LabApi, LabSettings, Meter, Person, RegisterRow, Standard } from '../../../app/api/contract';
import type { DraftSummary } from '../../../app/api/contract-drafts';
import type { FieldIssue } from '../../../app/api/errors';
import type { CheckDocumentInput } from '../../../app/api/schemas';
import { useLab } from '../lab/LabContext';
import { markProblems, useAnnounce } from '../shared/a11y';
import { Cautions } from '../shared/Cautions';
import { STATE_LABEL, formatBand, formatPower } from '../shared/format';
import { href } from '../shared/routes';
import { messageOf, useLoad } from '../shared/useLoad';
import {
  anyReadingTyped,
  availabilityOn,
  budgetDocument,
  emptyForm,
  fromDocument,
  pointsFromPlan,
  readingText,
  readingUnit,
  readyToJudge,
  toDocument,
} from './checkForm';
import type { CheckForm } from './checkForm';
import {
  DraftBar,
  DraftList,
  NumberField,
  RecordProblems,
  Review,
  perDirection,
  problemId,
} from './FormParts';
import type { RecordState } from './FormParts';
import type { Judged } from './useLiveJudgement';
import { PointsTable } from './PointsTable';
import { SweptPoints } from './SweptPoints';
import { useDraftAutosave } from './useDraftAutosave';
import { useLiveJudgement } from './useLiveJudgement';
import './record.css';

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

export function RecordCheckPage({ assetId, draftId }: { assetId?: string; draftId?: number }) {
  const api = useLab();
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
      {load.kind === 'ready' && <CheckEditor setup={load.value} />}
    </div>
  );
}

function CheckEditor({ setup }: { setup: Setup }) {
  const api = useLab();
  const [form, setForm] = useState<CheckForm>(setup.initial);
  const [meter, setMeter] = useState<Meter | null>(setup.meter);
  const [recordState, setRecordState] = useState<RecordState>({ kind: 'idle' });
  const [drafts, setDrafts] = useState(setup.drafts.filter((d) => d.draftId !== setup.draftId));
  const unit = readingUnit(meter ?? undefined);
  const draft = useDraftAutosave(JSON.stringify(toDocument(form, unit, 'draft')), setup.draftId);
  const { touch } = draft;
  const announce = useAnnounce();
  const formRef = useRef<HTMLFormElement>(null);
  const problemsId = useId();

  /** Every edit goes through here, so a draft is saved only once the technician typed something. */
  const edit = useCallback(
    (change: (f: CheckForm) => CheckForm) => {
      touch();
      setForm(change);
    },
    [touch],
  );

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
      draft.fail(messageOf(e));
    }
  }

  // --- live judgement of each point -----------------------------------------------------------
  const judgedNow = useLiveJudgement(
    form.points.map((p) => (readyToJudge(form, p) ? JSON.stringify(budgetDocument(form, p, unit)) : '')),
  );

  // --- recording ------------------------------------------------------------------------------
  async function record() {
    // The button stays focusable while busy (aria-disabled): a second press does nothing.
    if (recordState.kind === 'busy') return;
    setRecordState({ kind: 'busy' });
    try {
      const rec = await api.recordCheck(toDocument(form, unit, 'record') as unknown as CheckDocumentInput);
      await draft.finish();
      announce(`Check ${rec.checkId} recorded for ${form.meter}. Sign it on its page.`);
      // Signing and issuing follow on the check's own page.
      window.location.hash = href.check(rec.checkId);
    } catch (e) {
      const issues = (e as { issues?: FieldIssue[] }).issues ?? [];
      setRecordState({ kind: 'failed', message: messageOf(e), issues });
    }
  }

  async function discard() {
    await draft.finish();
    window.location.hash = href.register();
  }

  // A refusal marks the fields it names and moves focus to the first (or to the message).
  useEffect(() => {
    const root = formRef.current;
    if (recordState.kind !== 'failed' || !root) return;
    return markProblems(
      root,
      recordState.issues.map((i, k) => ({ field: i.field, messageId: problemId(problemsId, k) })),
      root.ownerDocument.getElementById(problemsId),
    );
  }, [recordState, problemsId]);

  const meterSelectId = useId();
  const meterRows = setup.meters.filter((m) => m.state !== 'withdrawn' || m.assetId === form.meter);
  const verdicts = form.points
    .map((_, i) => judgedNow(i))
    .filter((j): j is Extract<Judged, { kind: 'ok' }> => j?.kind === 'ok');

  return (
    <form
      ref={formRef}
      className="check-form"
      onSubmit={(e) => {
        e.preventDefault();
        void record();
      }}
      onBlur={draft.flush}
      noValidate
      aria-label="Check being recorded"
    >
      <DraftBar save={draft.save} onDiscard={() => void discard()} />
      {drafts.length > 0 && form.meter === '' && (
        <DraftList drafts={drafts} onGone={(id) => setDrafts((d) => d.filter((x) => x.draftId !== id))} />
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
              data-field="meter"
              value={form.meter}
              onChange={(e) => void chooseMeter(e.target.value)}
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
              data-field="date"
              aria-invalid={!ISO_DATE.test(form.date)}
              aria-describedby={ISO_DATE.test(form.date) ? undefined : `${meterSelectId}-date`}
              value={form.date}
              onChange={(e) => edit((f) => ({ ...f, date: e.target.value.trim() }))}
            />
          </label>
          {!ISO_DATE.test(form.date) && (
            <p className="field-problem" role="status" id={`${meterSelectId}-date`}>
              <span aria-hidden="true">✗ </span>write the date as YYYY-MM-DD, e.g. {localToday()}
            </p>
          )}
          <label className="field">
            <span>Performed by</span>
            <select
              data-field="performer"
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
                    data-field={s.assetId === setup.standards[0]?.assetId ? 'standards' : undefined}
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
            field="conditions.temperatureC"
            unit="°C"
            value={form.temperatureC}
            onChange={(v) => edit((f) => ({ ...f, temperatureC: v }))}
          />
          <NumberField
            label="Pressure"
            field="conditions.pressureHpa"
            unit="hPa"
            value={form.pressureHpa}
            onChange={(v) => edit((f) => ({ ...f, pressureHpa: v }))}
          />
          <NumberField
            label="Relative humidity"
            field="conditions.humidityPct"
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
          <SweptPoints form={form} unit={unit} edit={edit} />
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
          <button type="submit" className="button primary" aria-disabled={recordState.kind === 'busy'}>
            {recordState.kind === 'busy' ? 'Recording…' : 'Record the check'}
          </button>
        </div>
        {recordState.kind === 'failed' && <RecordProblems state={recordState} idBase={problemsId} />}
      </fieldset>
      <Cautions />
    </form>
  );
}
