// The lab's settings: identity for documents, the decision rule, the reliability target and
// the interval policy, the default uncertainties of bench conditions, and people with their keys. Saved through
// updateLab; a refusal names the field and nothing is changed.
import { useEffect, useId, useState } from 'react';
import type { LabSettings } from '../../../app/api/contract';
import type { FieldIssue } from '../../../app/api/errors';
import type { DecisionRule } from '../../../app/engine/model';
import { ImportHistory, IntegrityCheck } from './LongWork';
import { PeopleSection } from './PeopleSection';
import { Problems } from '../shared/Problems';
import { messageOf, useLoad } from '../shared/useLoad';
import { useLab } from '../lab/LabContext';
import './settings.css';

export function SettingsPage() {
  const api = useLab();
  const [load] = useLoad(() => api.getLab(), [api]);
  useEffect(() => {
    document.title = 'Settings · Dipledger';
  }, []);
  return (
    <div className="page">
      <header className="masthead">
        <h1>Settings</h1>
        <p className="subtitle">How this lab names itself, decides conformity and sets intervals</p>
      </header>
      {load.kind === 'loading' && <p className="status">Loading the settings…</p>}
      {load.kind === 'failed' && (
        <p className="status error" role="alert">
          The settings could not be loaded: {load.message}
        </p>
      )}
      {load.kind === 'ready' && <SettingsForm initial={load.value} />}
      <PeopleSection />
      <section className="step people" aria-labelledby="labfile-h">
        <h2 id="labfile-h" className="legend-like">
          History and the lab file
        </h2>
        <div className="people-forms">
          <ImportHistory />
          <IntegrityCheck />
        </div>
      </section>
    </div>
  );
}

export interface Fields {
  name: string;
  address: string;
  accreditation: string;
  rule: DecisionRule['kind'];
  multipleOfU: string;
  guardBandPpm: string;
  reliabilityPct: string;
  intervalMinMonths: string;
  intervalMaxMonths: string;
  uTemperatureC: string;
  uPressureHpa: string;
  uHumidityPct: string;
  printSuggestedInterval: boolean;
}

function toFields(s: LabSettings): Fields {
  return {
    name: s.name,
    address: s.address,
    accreditation: s.accreditation,
    rule: s.decisionRule.kind,
    multipleOfU: s.decisionRule.kind === 'guarded' ? String(s.decisionRule.multipleOfU) : '1',
    guardBandPpm: s.decisionRule.kind === 'guarded-fixed' ? String(s.decisionRule.guardBandPpm) : '100',
    reliabilityPct: String(Number((s.reliabilityTarget * 100).toFixed(4))),
    intervalMinMonths: String(s.intervalMinMonths),
    intervalMaxMonths: String(s.intervalMaxMonths),
    uTemperatureC: String(s.defaultTemperatureUncertaintyC),
    uPressureHpa: String(s.defaultPressureUncertaintyHpa),
    uHumidityPct: String(s.defaultHumidityUncertaintyPct),
    printSuggestedInterval: s.printSuggestedInterval,
  };
}

/** The form as the updateLab input; numbers that are not numbers go as typed, to be refused by
 * name. Settings this form does not show are sent back as they were, never reset to defaults. */
export function toSettingsInput(f: Fields, before: LabSettings): Record<string, unknown> {
  const num = (s: string): number | string => (s.trim() !== '' && Number.isFinite(Number(s)) ? Number(s) : s);
  const rule: Record<string, unknown> =
    f.rule === 'guarded'
      ? { kind: 'guarded', multipleOfU: num(f.multipleOfU) }
      : f.rule === 'guarded-fixed'
        ? { kind: 'guarded-fixed', guardBandPpm: num(f.guardBandPpm) }
        : { kind: f.rule };
  const pct = num(f.reliabilityPct);
  return {
    ...before,
    name: f.name,
    address: f.address,
    accreditation: f.accreditation,
    decisionRule: rule,
    reliabilityTarget: typeof pct === 'number' ? Number((pct / 100).toFixed(6)) : pct,
    intervalMinMonths: num(f.intervalMinMonths),
    intervalMaxMonths: num(f.intervalMaxMonths),
    defaultTemperatureUncertaintyC: num(f.uTemperatureC),
    defaultPressureUncertaintyHpa: num(f.uPressureHpa),
    defaultHumidityUncertaintyPct: num(f.uHumidityPct),
    printSuggestedInterval: f.printSuggestedInterval,
  };
}

const RULES: { kind: DecisionRule['kind']; label: string; note: string }[] = [
  { kind: 'simple', label: 'Simple acceptance', note: 'pass when the error is inside the tolerance' },
  {
    kind: 'guarded',
    label: 'Guarded, in multiples of U',
    note: 'acceptance limit = tolerance − w, with w a multiple of U',
  },
  {
    kind: 'guarded-fixed',
    label: 'Guarded, fixed width',
    note: 'acceptance limit = tolerance − a fixed guard band',
  },
  { kind: 'non-binary', label: 'Non-binary', note: 'pass, conditional pass, conditional fail or fail' },
];

function SettingsForm({ initial }: { initial: LabSettings }) {
  const api = useLab();
  const [saved, setSaved] = useState<LabSettings>(initial);
  const [f, setF] = useState<Fields>(toFields(initial));
  const [status, setStatus] = useState<
    | { kind: 'idle' }
    | { kind: 'busy' }
    | { kind: 'saved' }
    | { kind: 'failed'; message: string; issues: FieldIssue[] }
  >({ kind: 'idle' });
  const set = <K extends keyof Fields>(k: K, v: Fields[K]) => setF((x) => ({ ...x, [k]: v }));

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    // The button keeps focus while busy (aria-disabled): a second press does nothing.
    if (status.kind === 'busy') return;
    setStatus({ kind: 'busy' });
    try {
      const next = await api.updateLab(toSettingsInput(f, saved) as never);
      setSaved(next);
      setF(toFields(next));
      setStatus({ kind: 'saved' });
    } catch (err) {
      setStatus({
        kind: 'failed',
        message: messageOf(err),
        issues: (err as { issues?: FieldIssue[] }).issues ?? [],
      });
    }
  }

  const text = (k: keyof Fields, label: string, unit?: string, wide = false) => (
    <TextField
      label={label}
      unit={unit}
      wide={wide}
      value={f[k] as string}
      onChange={(v) => set(k, v as never)}
    />
  );

  return (
    <form className="settings-form" noValidate onSubmit={(e) => void submit(e)}>
      <fieldset className="step">
        <legend>Lab identity (printed on documents)</legend>
        {text('name', 'Name', undefined, true)}
        {text('address', 'Address', undefined, true)}
        {text('accreditation', 'Accreditation statement', undefined, true)}
      </fieldset>

      <fieldset className="step">
        <legend>Decision rule (ILAC-G8)</legend>
        {RULES.map((r) => (
          <label key={r.kind} className="choice block">
            <input
              type="radio"
              name="rule"
              checked={f.rule === r.kind}
              onChange={() => set('rule', r.kind)}
            />{' '}
            <strong>{r.label}</strong> <span className="muted">— {r.note}</span>
          </label>
        ))}
        <div className="row">
          {f.rule === 'guarded' && text('multipleOfU', 'Guard band w', 'U')}
          {f.rule === 'guarded-fixed' && text('guardBandPpm', 'Guard band w', 'ppm')}
        </div>
      </fieldset>

      <fieldset className="step">
        <legend>Intervals</legend>
        <div className="row">
          {text('reliabilityPct', 'Reliability target', '%')}
          {text('intervalMinMonths', 'Shortest interval', 'months')}
          {text('intervalMaxMonths', 'Longest interval', 'months')}
        </div>
        <label className="choice block">
          <input
            type="checkbox"
            checked={f.printSuggestedInterval}
            onChange={(e) => set('printSuggestedInterval', e.target.checked)}
          />{' '}
          Print a suggested interval on certificates (only when the customer or the lab’s policy asks for it)
        </label>
      </fieldset>

      <fieldset className="step">
        <legend>Default standard uncertainties of bench conditions</legend>
        <div className="row">
          {text('uTemperatureC', 'Temperature', '°C')}
          {text('uPressureHpa', 'Pressure', 'hPa')}
          {text('uHumidityPct', 'Relative humidity', '%RH')}
        </div>
      </fieldset>

      <div className="actions">
        <button type="submit" className="button primary" aria-disabled={status.kind === 'busy'}>
          Save the settings
        </button>
        <span role="status" className="status">
          {status.kind === 'saved' && '✓ Saved.'}
          {status.kind === 'busy' && 'Saving…'}
        </span>
      </div>
      {status.kind === 'failed' && <Problems verb="Not saved" state={status} />}
    </form>
  );
}

function TextField(props: {
  label: string;
  unit?: string;
  wide: boolean;
  value: string;
  onChange: (v: string) => void;
}) {
  const id = useId();
  const { label, unit, wide, value, onChange } = props;
  return (
    <div className={`field${wide ? ' wide' : ''}`}>
      <label htmlFor={id}>
        {label}
        {unit ? ` / ${unit}` : ''}
      </label>
      {unit ? (
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
      ) : (
        <input id={id} type="text" value={value} onChange={(e) => onChange(e.target.value)} />
      )}
    </div>
  );
}
