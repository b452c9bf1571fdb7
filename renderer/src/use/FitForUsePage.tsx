// Fit for use: type a frequency, see every meter whose band covers it and whether each may be
// used today, and for the one chosen the correction to apply and the uncertainty of a
// corrected reading there. Answers come from the fitForUse operation.
import { useEffect, useId, useRef, useState } from 'react';
import type { UseAnswer, UseReport } from '../../../app/api/contract-history';
import { formatDays, formatHz, formatPpm } from '../shared/format';
import { href } from '../shared/routes';
import { messageOf } from '../shared/useLoad';
import { useLab } from '../lab/LabContext';
import { useAnnounce } from '../shared/a11y';
import { LogUse } from './LogUse';
import './use.css';

type Ask =
  | { kind: 'idle' }
  | { kind: 'busy' }
  | { kind: 'failed'; message: string }
  | { kind: 'ready'; report: UseReport };

export function FitForUsePage() {
  const api = useLab();
  const id = useId();
  const [frequency, setFrequency] = useState('');
  const [ask, setAsk] = useState<Ask>({ kind: 'idle' });
  const [chosen, setChosen] = useState<string | null>(null);
  const announce = useAnnounce();
  const inputRef = useRef<HTMLInputElement>(null);
  const problemId = `${id}-problem`;
  useEffect(() => {
    document.title = 'Fit for use · Dipledger';
  }, []);

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    // Ask stays focusable while busy (aria-disabled): a second press waits for the first answer.
    if (ask.kind === 'busy') return;
    setAsk({ kind: 'busy' });
    setChosen(null);
    try {
      const report = await api.fitForUse({ frequency: frequency.trim() });
      setAsk({ kind: 'ready', report });
      setChosen(report.answers.find((a) => a.fit)?.assetId ?? null);
      const fit = report.answers.filter((a) => a.fit).length;
      announce(
        report.answers.length === 0
          ? 'No meter of the lab covers that frequency.'
          : `${report.answers.length} meters cover ${formatHz(report.frequencyHz, 4)}; ${fit} may be used.`,
      );
    } catch (err) {
      setAsk({ kind: 'failed', message: messageOf(err) });
      // The field stays focused and is marked; the message is read as its description.
      inputRef.current?.focus();
    }
  }

  return (
    <div className="page">
      <header className="masthead">
        <h1>Fit for use</h1>
        <p className="subtitle">
          Which meter may be used at a frequency today, with what correction and uncertainty
        </p>
      </header>
      <form className="toolbar" onSubmit={(e) => void submit(e)} noValidate>
        <label htmlFor={id}>Frequency, with its unit</label>
        <input
          id={id}
          ref={inputRef}
          type="text"
          placeholder="e.g. 9.375 GHz"
          aria-invalid={ask.kind === 'failed'}
          aria-describedby={ask.kind === 'failed' ? problemId : undefined}
          value={frequency}
          onChange={(e) => setFrequency(e.target.value)}
        />
        <button type="submit" className="button primary" aria-disabled={ask.kind === 'busy'}>
          Ask
        </button>
      </form>
      {ask.kind === 'failed' && (
        <p className="status error" role="alert" id={problemId}>
          <span aria-hidden="true">✗ </span>
          {ask.message}
        </p>
      )}
      {ask.kind === 'ready' && <Answers report={ask.report} chosen={chosen} onChoose={setChosen} />}
    </div>
  );
}

function Answers({
  report,
  chosen,
  onChoose,
}: {
  report: UseReport;
  chosen: string | null;
  onChoose: (assetId: string) => void;
}) {
  if (report.answers.length === 0)
    return (
      <p className="status error" role="status" data-testid="use-none">
        <span aria-hidden="true">▲ </span>No meter of the lab covers {formatHz(report.frequencyHz, 4)}.
      </p>
    );
  const pick = report.answers.find((a) => a.assetId === chosen);
  return (
    <>
      <p className="hint">
        At {formatHz(report.frequencyHz, 4)}, as of {report.asOf}
        {report.notes.length ? ` · ${report.notes.join(' ')}` : ''}
      </p>
      <div className="table-wrap">
        <table className="grid use">
          <caption className="visually-hidden">Meters covering the frequency</caption>
          <thead>
            <tr>
              <th scope="col">Meter</th>
              <th scope="col">May it be used?</th>
              <th scope="col" className="num">
                Correction
              </th>
              <th scope="col" className="num">
                U (k)
              </th>
              <th scope="col" className="num">
                Due date
              </th>
              <th scope="col">
                <span className="visually-hidden">Choose</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {report.answers.map((a) => (
              <tr key={a.assetId} data-asset-id={a.assetId} className={a.fit ? undefined : 'not-fit'}>
                <th scope="row" className="asset">
                  <a href={href.meter(a.assetId)}>{a.assetId}</a>
                </th>
                <td className="wrap">
                  {a.fit ? (
                    <span className="verdict verdict-pass">
                      <span aria-hidden="true">✓</span> Yes
                    </span>
                  ) : (
                    <span className="verdict verdict-fail">
                      <span aria-hidden="true">✗</span> No
                    </span>
                  )}
                  {(a.reasons.length > 0 || a.warnings.length > 0) && (
                    <ul className="use-reasons">
                      {a.reasons.map((r) => (
                        <li key={r.code} className="reason">
                          {r.message}
                        </li>
                      ))}
                      {a.warnings.map((w) => (
                        <li key={w} className="warning">
                          <span aria-hidden="true">⚠ </span>
                          {w}
                        </li>
                      ))}
                    </ul>
                  )}
                </td>
                <td className="num">{a.correction ? formatPpm(a.correction.correctionPpm) : '—'}</td>
                <td className="num">
                  {a.uncertainty
                    ? `±${a.uncertainty.expandedPpm.toFixed(1)} ppm (${a.uncertainty.coverageFactor.toFixed(2)})`
                    : '—'}
                </td>
                <td className="num">
                  {a.dueDate ?? '—'}
                  {a.daysToDue !== null ? ` (${formatDays(a.daysToDue)})` : ''}
                </td>
                <td>
                  <button
                    type="button"
                    className="toggle"
                    aria-pressed={a.assetId === chosen}
                    onClick={() => onChoose(a.assetId)}
                  >
                    details<span className="visually-hidden"> of {a.assetId}</span>
                  </button>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {pick && <Detail a={pick} />}
    </>
  );
}

function Detail({ a }: { a: UseAnswer }) {
  return (
    <section className="step use-detail" aria-label={`${a.assetId} at ${formatHz(a.frequencyHz, 4)}`}>
      <h2>
        {a.assetId} at {formatHz(a.frequencyHz, 4)}
      </h2>
      {a.correction ? (
        <p data-testid="use-correction">
          Add <strong>{formatPpm(a.correction.correctionPpm, 2)}</strong> (
          {signedHz(a.correction.correctionHz)}, u = {a.correction.uPpm.toFixed(2)} ppm) to a reading; from
          the check of {a.correction.fromCheckDate}, {a.correction.basis}.
        </p>
      ) : (
        <p className="muted">No correction available.</p>
      )}
      {a.uncertainty && (
        <>
          <p>
            Expanded uncertainty of a corrected reading:{' '}
            <strong>±{a.uncertainty.expandedPpm.toFixed(1)} ppm</strong> (±
            {formatHz(a.uncertainty.expandedHz, 3)}, k = {a.uncertainty.coverageFactor.toFixed(2)}, about 95
            %).
          </p>
          <table className="grid lines">
            <thead>
              <tr>
                <th scope="col">Contribution</th>
                <th scope="col" className="num">
                  Standard uncertainty
                </th>
              </tr>
            </thead>
            <tbody>
              {a.uncertainty.lines.map((l) => (
                <tr key={l.label}>
                  <td>{l.label}</td>
                  <td className="num">{l.uPpm.toFixed(2)} ppm</td>
                </tr>
              ))}
            </tbody>
          </table>
        </>
      )}
      {a.fit && <LogUse assetId={a.assetId} frequencyHz={a.frequencyHz} />}
      <p className="hint">
        The answer supports, and never replaces, your lab’s quality system. Do not exceed the meter’s maximum
        input power (see its page).
      </p>
    </section>
  );
}

/** A signed frequency with a true minus sign, as corrections are written. */
function signedHz(hz: number): string {
  const text = formatHz(Math.abs(hz), 3);
  return `${hz < 0 ? '−' : '+'}${text}`;
}
