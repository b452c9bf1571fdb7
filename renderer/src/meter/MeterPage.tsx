// One meter: identity, band, stated accuracy, state and due date, its maximum input power in
// plain sight, the error-against-frequency chart of its newest checks, its drift, health and
// suggested interval, its checks with revisions and signatures, its audit history, and the
// state changes (quarantine, withdraw, return to service), each with a reason.
import { useEffect, useState } from 'react';
import type { CheckRecord, LabApi, Meter, MeterDetail } from '../../../app/api/contract';
import type { MeterState } from '../../../app/engine/model';
import { ErrorChart } from '../charts/ErrorChart';
import { AuditHistory, CheckRevisions } from './MeterRecords';
import { TrendSection } from './TrendSection';
import {
  STATE_LABEL,
  VERDICT_LABEL,
  dueStatus,
  formatAccuracy,
  formatBand,
  formatDays,
  formatHz,
  formatHzShort,
  formatPower,
  formatPpm,
} from '../shared/format';
import { href } from '../shared/routes';
import { WorksheetButton } from './WorksheetButton';
import { messageOf, useLoad } from '../shared/useLoad';
import { useLab } from '../lab/LabContext';
import './meter.css';
import { decimal, significant } from '../../../app/model/quantity-format';

/** How many of the newest checks the chart compares. */
export const CHART_CHECKS = 3;

interface MeterView {
  detail: MeterDetail;
  recent: CheckRecord[];
}

async function loadMeter(api: LabApi, assetId: string): Promise<MeterView> {
  const detail = await api.getMeter(assetId);
  const recent = await Promise.all(detail.checks.slice(0, CHART_CHECKS).map((c) => api.getCheck(c.checkId)));
  return { detail, recent };
}

export function MeterPage({ assetId }: { assetId: string }) {
  const api = useLab();
  const [load, reload] = useLoad(() => loadMeter(api, assetId), [api, assetId]);
  useEffect(() => {
    document.title = `${assetId} · Dipledger`;
  }, [assetId]);

  if (load.kind === 'loading')
    return (
      <div className="page">
        <p className="status">Loading {assetId}…</p>
      </div>
    );
  if (load.kind === 'failed')
    return (
      <div className="page">
        <header className="masthead">
          <h1>{assetId}</h1>
        </header>
        <p className="status error" role="alert">
          This meter could not be loaded: {load.message}
        </p>
        <p>
          <a href={href.register()}>Back to the register</a>
        </p>
      </div>
    );

  const { detail, recent } = load.value;
  const m = detail.meter;
  const r = detail.register;
  const state = STATE_LABEL[m.state];

  return (
    <div className="page meter-page">
      <header className="masthead">
        <p className="crumbs">
          <a href={href.register()}>Register</a> › {m.assetId}
        </p>
        <h1>
          {m.assetId} <span className="h1-sub">{m.description}</span>
        </h1>
        <p className="subtitle">
          {m.construction === 'waveguide' ? 'Waveguide' : 'Coaxial'}
          {m.port ? `, ${m.port}` : ''}
          {m.location ? ` · kept at ${m.location}` : ''}
        </p>
      </header>

      <aside className="power-limit" aria-label="Maximum input power">
        <span className="power-symbol" aria-hidden="true">
          ⚠
        </span>
        <div>
          <p className="power-label">Maximum input power</p>
          <p className="power-value">{formatPower(m.maxInputPowerW)}</p>
        </div>
        <p className="power-note">
          Never feed this meter more. Overdriving can damage the cavity and its coupling, and shifts the
          reading as it warms; quarantine a meter that has been overdriven. Keep clear of open waveguide while
          a high-power source is on.
        </p>
      </aside>

      <section className="facts" aria-label="Meter facts">
        <Fact label="State">
          <span className={`badge state-badge-${m.state}`} data-testid="meter-state">
            <span aria-hidden="true">{state.symbol}</span> {state.word}
          </span>
        </Fact>
        <Fact label="Band">{formatBand(m.minHz, m.maxHz)}</Fact>
        <Fact label="Stated accuracy">{formatAccuracy(m.accuracyRelPpm, m.accuracyAbsHz)}</Fact>
        <Fact label="Dial">
          {m.dialKind === 'direct'
            ? `direct-reading, resolution ${formatHzShort(m.resolution)}`
            : `micrometer with chart, resolution ${m.resolution} div`}
        </Fact>
        <Fact label="Last check">
          {r.lastCheckDate ?? 'never'}
          {r.lastVerdict && (
            <span className={`verdict verdict-${r.lastVerdict}`}>
              {' '}
              <span aria-hidden="true">{VERDICT_LABEL[r.lastVerdict].symbol}</span>{' '}
              {VERDICT_LABEL[r.lastVerdict].word}
            </span>
          )}
        </Fact>
        <Fact label="Due date">
          <span
            className={`days-${m.state === 'withdrawn' ? 'none' : dueStatus(r.daysToDue)}`}
            data-testid="meter-due"
          >
            {r.dueDate ?? '—'}
            {m.state !== 'withdrawn' && r.daysToDue !== null && ` (${formatDays(r.daysToDue)})`}
          </span>
        </Fact>
        <Fact label="Interval">{m.intervalMonths} months</Fact>
        <Fact label="Loaded Q">{m.loadedQ.toFixed(0)}</Fact>
        <Fact label="Reference conditions">
          {m.reference.temperatureC} °C, {m.reference.pressureHpa} hPa, {m.reference.humidityPct} %RH
        </Fact>
        <Fact label="Check plan">
          {m.planHz.length
            ? `${m.planHz.length} frequencies: ${m.planHz.map((f) => formatHzShort(f)).join(', ')}`
            : 'none set'}
        </Fact>
      </section>

      <div className="actions">
        {m.state === 'withdrawn' ? (
          <span className="muted">Withdrawn: return it to service before recording a check.</span>
        ) : (
          <a className="button primary" href={href.record(m.assetId)}>
            Record a check of {m.assetId}
          </a>
        )}
        <WorksheetButton assetId={m.assetId} />
      </div>

      <section aria-labelledby="chart-title">
        <h2 id="chart-title">Error against frequency, newest checks</h2>
        <ErrorChart meter={m} checks={recent} />
      </section>

      <TrendSection assetId={m.assetId} />

      <section aria-labelledby="checks-title">
        <h2 id="checks-title">Checks</h2>
        <ChecksTable detail={detail} />
      </section>

      <section aria-labelledby="revisions-title">
        <h2 id="revisions-title">Revisions and signatures</h2>
        <CheckRevisions detail={detail} />
      </section>

      <section aria-labelledby="audit-title">
        <h2 id="audit-title">Audit history</h2>
        <AuditHistory detail={detail} />
      </section>

      <section aria-labelledby="state-title">
        <h2 id="state-title">Change its state</h2>
        <StateChange meter={m} onChanged={reload} />
      </section>
    </div>
  );
}

function Fact({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <div className="fact">
      <dt>{label}</dt>
      <dd>{children}</dd>
    </div>
  );
}

const RECORD_STATE: Record<CheckRecord['state'], string> = {
  draft: '✎ not signed yet',
  signed: '✔ signed',
  amended: '↻ amended',
};

function ChecksTable({ detail }: { detail: MeterDetail }) {
  const [open, setOpen] = useState<number | null>(null);
  if (detail.checks.length === 0) return <p className="muted">No checks recorded yet.</p>;
  return (
    <div className="table-wrap">
      <table className="grid checks">
        <caption className="visually-hidden">Checks of {detail.meter.assetId}, newest first</caption>
        <thead>
          <tr>
            <th scope="col">Date</th>
            <th scope="col" className="num">
              Check
            </th>
            <th scope="col" className="num">
              Rev.
            </th>
            <th scope="col">Record</th>
            <th scope="col">Performer</th>
            <th scope="col" className="num">
              Points
            </th>
            <th scope="col">As found</th>
            <th scope="col">As left</th>
            <th scope="col" className="num">
              Worst |error| / tolerance
            </th>
            <th scope="col">
              <span className="visually-hidden">Points</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {detail.checks.map((c) => (
            <CheckRows
              key={c.checkId}
              summary={c}
              open={open === c.checkId}
              onToggle={() => setOpen(open === c.checkId ? null : c.checkId)}
            />
          ))}
        </tbody>
      </table>
    </div>
  );
}

function VerdictCell({ v }: { v: CheckRecord['asFoundVerdict'] }) {
  if (!v) return <span className="muted">—</span>;
  return (
    <span className={`verdict verdict-${v}`}>
      <span aria-hidden="true">{VERDICT_LABEL[v].symbol}</span> {VERDICT_LABEL[v].word}
    </span>
  );
}

function CheckRows({
  summary: c,
  open,
  onToggle,
}: {
  summary: MeterDetail['checks'][number];
  open: boolean;
  onToggle: () => void;
}) {
  return (
    <>
      <tr data-check-id={c.checkId} data-date={c.date}>
        <th scope="row" className="num-left">
          {c.date}
        </th>
        <td className="num">{c.checkId}</td>
        <td className="num">{c.revision}</td>
        <td>{RECORD_STATE[c.state]}</td>
        <td>{c.performer}</td>
        <td className="num">{c.pointCount}</td>
        <td>
          <VerdictCell v={c.asFoundVerdict} />
        </td>
        <td>
          <VerdictCell v={c.asLeftVerdict} />
        </td>
        <td className="num">
          {c.worstUsedFraction === null ? '—' : `${(c.worstUsedFraction * 100).toFixed(1)} %`}
        </td>
        <td>
          <button type="button" className="link" aria-expanded={open} onClick={onToggle}>
            {open ? 'Hide points' : 'Points'}
          </button>
        </td>
      </tr>
      {open && (
        <tr className="detail-row">
          <td colSpan={10}>
            <CheckPoints checkId={c.checkId} />
          </td>
        </tr>
      )}
    </>
  );
}

function CheckPoints({ checkId }: { checkId: number }) {
  const api = useLab();
  const [load] = useLoad(() => api.getCheck(checkId), [api, checkId]);
  if (load.kind === 'loading') return <p className="status">Loading the points…</p>;
  if (load.kind === 'failed') return <p role="alert">{load.message}</p>;
  const c = load.value;
  return (
    <div>
      <p className="check-meta">
        Standards {c.standards.join(', ')} · {c.conditions.temperatureC} °C, {c.conditions.pressureHpa} hPa,{' '}
        {c.conditions.humidityPct} %RH · method {c.method}
        {c.remarks ? ` · ${c.remarks}` : ''}
      </p>
      <table className="grid points">
        <thead>
          <tr>
            <th scope="col">Phase</th>
            <th scope="col" className="num">
              Reference
            </th>
            <th scope="col" className="num">
              Indicated
            </th>
            <th scope="col" className="num">
              Error
            </th>
            <th scope="col" className="num">
              U (k)
            </th>
            <th scope="col" className="num">
              Tolerance
            </th>
            <th scope="col">Verdict</th>
          </tr>
        </thead>
        <tbody>
          {c.points.map((p) => (
            <tr key={p.seq}>
              <td>{p.phase.replace('-', ' ')}</td>
              <td className="num">{formatHz(p.referenceHz, 4)}</td>
              <td className="num">{formatHz(p.result.indicatedHz, 6)}</td>
              <td className="num">{formatPpm(p.result.errorPpm)}</td>
              <td className="num">
                ±{significant(p.result.expandedPpm, 2)} ppm ({decimal(p.result.budget.coverageFactor, 2)})
              </td>
              <td className="num">
                ±{decimal((p.result.decision.toleranceHz / Math.abs(p.result.correctedHz)) * 1e6, 0)} ppm
              </td>
              <td>
                <VerdictCell v={p.result.decision.verdict} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

const STATE_ACTION: Record<MeterState, string> = {
  quarantined: 'Quarantine',
  withdrawn: 'Withdraw',
  'in-service': 'Return to service',
};

function StateChange({ meter, onChanged }: { meter: Meter; onChanged: () => void }) {
  const api = useLab();
  const options = (['in-service', 'quarantined', 'withdrawn'] as const).filter((s) => s !== meter.state);
  const [target, setTarget] = useState<MeterState>(options[0] ?? 'quarantined');
  const [reason, setReason] = useState('');
  const [status, setStatus] = useState<{ kind: 'idle' | 'busy' | 'done' | 'failed'; text: string }>({
    kind: 'idle',
    text: '',
  });

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setStatus({ kind: 'busy', text: 'Saving…' });
    try {
      const m = await api.changeMeterState({ assetId: meter.assetId, state: target, reason });
      setStatus({ kind: 'done', text: `${m.assetId} is now ${STATE_LABEL[m.state].word.toLowerCase()}.` });
      setReason('');
      onChanged();
    } catch (err) {
      setStatus({ kind: 'failed', text: messageOf(err) });
    }
  }

  return (
    <form className="state-form" onSubmit={(e) => void submit(e)}>
      <fieldset>
        <legend>
          Now{' '}
          <strong>
            {STATE_LABEL[meter.state].symbol} {STATE_LABEL[meter.state].word}
          </strong>
          . Move it to:
        </legend>
        {options.map((s) => (
          <label key={s} className="choice">
            <input
              type="radio"
              name="target-state"
              value={s}
              checked={target === s}
              onChange={() => setTarget(s)}
            />{' '}
            <span aria-hidden="true">{STATE_LABEL[s].symbol}</span> {STATE_LABEL[s].word}
          </label>
        ))}
      </fieldset>
      <label className="field wide">
        <span>Reason (kept in the audit trail)</span>
        <input
          type="text"
          value={reason}
          onChange={(e) => setReason(e.target.value)}
          placeholder="e.g. dropped on the bench; dip much shallower than usual"
          required
          minLength={3}
        />
      </label>
      <button type="submit" className="button" disabled={status.kind === 'busy'}>
        {STATE_ACTION[target]}
      </button>
      {status.kind !== 'idle' && (
        <p
          className={status.kind === 'failed' ? 'status error' : 'status'}
          role={status.kind === 'failed' ? 'alert' : 'status'}
        >
          {status.kind === 'failed' ? `Not changed: ${status.text}` : status.text}
        </p>
      )}
    </form>
  );
}
