// "Add a meter" on the register: the specification a lab needs before its first check, with a
// micrometer's chart rows pasted or read from a CSV file and drawn before saving. The service
// judges the whole; a refusal lists every field it named and nothing is written.
import { useId, useState } from 'react';
import type { FormEvent } from 'react';
import type { FieldIssue } from '../../../app/api/errors';
import { LabError } from '../../../app/api/errors';
import { useLab } from '../lab/LabContext';
import { Problems } from '../shared/Problems';
import { messageOf } from '../shared/useLoad';
import { ChartPreview } from './ChartPreview';
import { readChartRows } from './chartRows';
import './setup.css';

interface Fields {
  assetId: string;
  description: string;
  construction: 'coaxial' | 'waveguide';
  port: string;
  min: string;
  max: string;
  dialKind: 'direct' | 'divisions';
  resolution: string;
  accuracyRelPpm: string;
  alphaPerK: string;
  maxInputPowerW: string;
  intervalMonths: string;
  plan: string;
  location: string;
}

const EMPTY: Fields = {
  assetId: '',
  description: '',
  construction: 'coaxial',
  port: '',
  min: '',
  max: '',
  dialKind: 'direct',
  resolution: '',
  accuracyRelPpm: '1000',
  alphaPerK: '0.000017',
  maxInputPowerW: '1',
  intervalMonths: '12',
  plan: '',
  location: '',
};

type Status = { kind: 'idle' } | { kind: 'busy' } | { kind: 'failed'; message: string; issues: FieldIssue[] };

/** The meter document the form describes (dipledger meter.json). */
export function meterDocument(f: Fields, chartText: string): Record<string, unknown> {
  const num = (s: string) => (s.trim() === '' ? s : Number(s));
  return {
    assetId: f.assetId.trim(),
    description: f.description,
    construction: f.construction,
    port: f.port,
    min: f.min,
    max: f.max,
    dialKind: f.dialKind,
    resolution: f.dialKind === 'divisions' ? num(f.resolution) : f.resolution,
    chart: f.dialKind === 'divisions' ? readChartRows(chartText).rows : [],
    accuracyRelPpm: num(f.accuracyRelPpm),
    alphaPerK: num(f.alphaPerK),
    maxInputPowerW: num(f.maxInputPowerW),
    intervalMonths: num(f.intervalMonths),
    plan: f.plan
      .split(/[;,\n]/)
      .map((p) => p.trim())
      .filter(Boolean),
    location: f.location,
  };
}

export function AddMeterForm({ onAdded }: { onAdded: (assetId: string) => void }) {
  const api = useLab();
  const id = useId();
  const [f, setF] = useState<Fields>(EMPTY);
  const [chartText, setChartText] = useState('');
  const [status, setStatus] = useState<Status>({ kind: 'idle' });
  const chart = readChartRows(chartText);
  const set = (k: keyof Fields) => (e: { target: { value: string } }) => setF({ ...f, [k]: e.target.value });
  const field = (k: keyof Fields, label: string, hint?: string) => (
    <label htmlFor={`${id}-${k}`}>
      {label}
      <input id={`${id}-${k}`} value={f[k]} onChange={set(k)} />
      {hint && <span className="hint">{hint}</span>}
    </label>
  );

  const submit = async (e: FormEvent) => {
    e.preventDefault();
    setStatus({ kind: 'busy' });
    try {
      const m = await api.createMeter(meterDocument(f, chartText) as never);
      setStatus({ kind: 'idle' });
      onAdded(m.assetId);
    } catch (err) {
      setStatus({
        kind: 'failed',
        message: messageOf(err),
        issues: err instanceof LabError ? err.issues : [],
      });
    }
  };

  const readFile = async (file: File | undefined) => {
    if (file) setChartText(await file.text());
  };

  return (
    <form className="setup-form" aria-label="Add a meter" onSubmit={(e) => void submit(e)}>
      <h2>Add a meter</h2>
      <div className="setup-grid">
        {field('assetId', 'Asset id')}
        {field('description', 'Description')}
        <label htmlFor={`${id}-construction`}>
          Construction
          <select id={`${id}-construction`} value={f.construction} onChange={set('construction')}>
            <option value="coaxial">coaxial</option>
            <option value="waveguide">waveguide</option>
          </select>
        </label>
        {field('port', 'Connector or waveguide size')}
        {field('min', 'Band from', 'with unit, e.g. 8.2 GHz')}
        {field('max', 'Band to', 'with unit, e.g. 12.4 GHz')}
        <label htmlFor={`${id}-dialKind`}>
          Dial
          <select id={`${id}-dialKind`} value={f.dialKind} onChange={set('dialKind')}>
            <option value="direct">direct-reading</option>
            <option value="divisions">micrometer in divisions, with a chart</option>
          </select>
        </label>
        {field(
          'resolution',
          'Dial resolution',
          f.dialKind === 'direct' ? 'a frequency, e.g. 1 MHz' : 'in divisions, e.g. 0.01',
        )}
        {field('accuracyRelPpm', 'Stated accuracy (ppm of reading)')}
        {field('alphaPerK', 'Thermal coefficient (1/K)')}
        {field('maxInputPowerW', 'Maximum input power (W)')}
        {field('intervalMonths', 'Interval (months)')}
        {field('plan', 'Check plan', 'frequencies separated by ";"')}
        {field('location', 'Location')}
      </div>
      {f.dialKind === 'divisions' && (
        <fieldset className="chart-rows">
          <legend>Chart rows</legend>
          <label htmlFor={`${id}-chart`}>
            Paste rows: divisions, frequency (one a line)
            <textarea
              id={`${id}-chart`}
              rows={6}
              value={chartText}
              onChange={(e) => setChartText(e.target.value)}
            />
          </label>
          <label htmlFor={`${id}-chart-file`}>
            or read them from a CSV file
            <input
              id={`${id}-chart-file`}
              type="file"
              accept=".csv,text/csv,text/plain"
              onChange={(e) => void readFile(e.target.files?.[0])}
            />
          </label>
          {chart.problems.length > 0 && (
            <ul className="problems" role="alert">
              {chart.problems.map((p) => (
                <li key={p}>{p}</li>
              ))}
            </ul>
          )}
          <ChartPreview rows={chart.rows} />
        </fieldset>
      )}
      <p className="caution">
        The maximum input power is shown wherever the meter is used: more can damage the cavity.
      </p>
      <button type="submit" disabled={status.kind === 'busy'}>
        Add the meter
      </button>
      {status.kind === 'failed' && <Problems verb="The meter was not added" state={status} />}
    </form>
  );
}
