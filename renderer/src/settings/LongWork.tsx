// Long work with its progress in sight and a way to stop it: a history import cut into pieces of
// whole checks, and a check of the whole lab file. Stopping waits for the piece under way, so
// nothing is ever half-written; what was done before stays done and is said so.
import { useId, useRef, useState } from 'react';
import type { LabApi } from '../../../app/api/contract';
import type { IntegrityReport } from '../../../app/api/contract-records';
import { inFileLines, planCsv } from './csvChunks';
import { messageOf } from '../shared/useLoad';
import { useLab } from '../lab/LabContext';

export type Progress =
  | { kind: 'idle' }
  | { kind: 'running'; done: number; total: number; what: string; stopping: boolean }
  | { kind: 'finished'; text: string }
  | { kind: 'stopped'; text: string }
  | { kind: 'failed'; text: string };

export function ProgressLine({ progress, unit }: { progress: Progress; unit: string }) {
  if (progress.kind === 'idle') return null;
  if (progress.kind === 'running')
    return (
      <div className="progress" data-testid="progress">
        <progress max={progress.total} value={progress.done} aria-label={`${unit} done`} />
        <span role="status">
          {progress.done} of {progress.total} {unit} · {progress.what}
          {progress.stopping ? ' · stopping after this piece…' : ''}
        </span>
      </div>
    );
  return (
    <p
      className={`status ${progress.kind === 'finished' ? 'ok' : 'error'}`}
      role={progress.kind === 'failed' ? 'alert' : 'status'}
      data-testid="progress-result"
    >
      {progress.kind === 'finished' ? '✓ ' : progress.kind === 'stopped' ? '■ ' : '✗ '}
      {progress.text}
    </p>
  );
}

/** Checks per piece: a piece of at least 100 checks is written by the service's import writer
 * thread while the next check is computed (app/api/import-writer.ts), about twice as fast as
 * smaller ones, and 200 checks still take only about a tenth of a second, so the progress bar
 * moves several times a second and a stop comes quickly. */
const CHECKS_PER_PIECE = 200;

export function ImportHistory({ checksPerChunk = CHECKS_PER_PIECE }: { checksPerChunk?: number }) {
  const api = useLab();
  const fileId = useId();
  const [progress, setProgress] = useState<Progress>({ kind: 'idle' });
  const stop = useRef(false);

  async function run(file: File | undefined) {
    if (!file) return;
    stop.current = false;
    let plan;
    try {
      plan = planCsv(await file.text(), checksPerChunk);
    } catch (e) {
      setProgress({
        kind: 'failed',
        text: `${file.name} could not be read: ${messageOf(e)}. Nothing was imported.`,
      });
      return;
    }
    let checks = 0;
    let points = 0;
    for (const [i, chunk] of plan.chunks.entries()) {
      if (stop.current) {
        setProgress({
          kind: 'stopped',
          text: `Stopped: ${checks} of ${plan.checks} checks of ${file.name} were imported, whole; the rest were not. To finish, import a file of the remaining checks only: the checks already in (same meter and date) are refused, and with them the piece that holds them.`,
        });
        return;
      }
      setProgress({
        kind: 'running',
        done: checks,
        total: plan.checks,
        what: `importing ${file.name}`,
        stopping: false,
      });
      try {
        const r = await api.importCsv(chunk.text);
        checks += r.checksImported;
        points += r.pointsImported;
      } catch (e) {
        setProgress({
          kind: 'failed',
          text: `${inFileLines(messageOf(e), chunk)}. The piece holding it (${chunk.checks} checks) was not imported; ${checks} checks before it were${i + 1 < plan.chunks.length ? ', and nothing after it' : ''}.`,
        });
        return;
      }
    }
    setProgress({ kind: 'finished', text: `${checks} checks (${points} points) of ${file.name} imported.` });
  }

  const running = progress.kind === 'running';
  return (
    <div className="subform" data-testid="import-history">
      <h3>Import a history CSV</h3>
      <p className="hint">
        Rows of one meter and date form a check (see the exchange formats). Large files go in pieces of{' '}
        {checksPerChunk} checks; stopping keeps whole checks only.
      </p>
      <div className="row">
        <div className="field">
          <label htmlFor={fileId}>History file (.csv)</label>
          <input
            id={fileId}
            type="file"
            accept=".csv,text/csv"
            disabled={running}
            onChange={(e) => {
              void run(e.target.files?.[0]);
              e.target.value = '';
            }}
          />
        </div>
        {running && (
          <button
            type="button"
            className="button"
            aria-disabled={progress.stopping}
            onClick={() => {
              stop.current = true;
              setProgress((p) => (p.kind === 'running' ? { ...p, stopping: true } : p));
            }}
          >
            Stop the import
          </button>
        )}
      </div>
      <ProgressLine progress={progress} unit="checks" />
    </div>
  );
}

export function IntegrityCheck({ now = () => Date.now() }: { now?: () => number }) {
  const api = useLab();
  const [state, setState] = useState<
    | { kind: 'idle' }
    | { kind: 'running'; since: number }
    | { kind: 'done'; report: IntegrityReport; ms: number }
    | { kind: 'failed'; message: string }
  >({ kind: 'idle' });

  async function run() {
    const since = now();
    setState({ kind: 'running', since });
    try {
      const report = await api.verifyIntegrity();
      setState({ kind: 'done', report, ms: now() - since });
    } catch (e) {
      setState({ kind: 'failed', message: messageOf(e) });
    }
  }

  return (
    <div className="subform" data-testid="integrity">
      <h3>Check the lab file</h3>
      <p className="hint">
        SQLite’s own check, every link of the audit trail and every signature. It only reads, so it runs to
        the end; on a large lab it takes a while.
      </p>
      <div className="actions">
        <button
          type="button"
          className="button"
          aria-disabled={state.kind === 'running'}
          onClick={() => state.kind !== 'running' && void run()}
        >
          Check the lab file
        </button>
        {state.kind === 'running' && (
          <span className="progress" role="status">
            <progress aria-label="checking the lab file" /> checking…
          </span>
        )}
      </div>
      {state.kind === 'done' && (
        <div
          role="status"
          className={`status ${state.report.ok ? 'ok' : 'error'}`}
          data-testid="integrity-result"
        >
          <p>
            {state.report.ok ? '✓ Sound' : '✗ PROBLEMS FOUND'}: {state.report.auditEntries} audit entries,{' '}
            {state.report.signaturesChecked} signatures checked, SQLite: {state.report.sqlite.join('; ')} (
            {(state.ms / 1000).toFixed(1)} s).
          </p>
          <p className="mono muted">Newest audit hash {state.report.auditHead}: note it outside the file.</p>
          {state.report.problems.length > 0 && (
            <ul>
              {state.report.problems.map((p, i) => (
                <li key={i}>
                  {p.record}: {p.problem} — {p.affects}
                </li>
              ))}
            </ul>
          )}
        </div>
      )}
      {state.kind === 'failed' && (
        <p role="alert" className="status error">
          ✗ The check could not run: {state.message}
        </p>
      )}
    </div>
  );
}

/** Signed checks (their effective revision) that have no certificate yet, oldest first. */
export async function checksWithoutCertificate(
  api: LabApi,
): Promise<{ checkId: number; meter: string; date: string }[]> {
  const [meters, documents] = await Promise.all([api.listMeters(), api.listDocuments({})]);
  const certified = new Set(documents.filter((d) => d.kind === 'certificate').map((d) => d.checkId));
  const out: { checkId: number; meter: string; date: string }[] = [];
  for (const m of meters) {
    const detail = await api.getMeter(m.assetId);
    for (const c of detail.checks)
      if (c.state === 'signed' && !certified.has(c.checkId))
        out.push({ checkId: c.checkId, meter: m.assetId, date: c.date });
  }
  return out.sort((a, b) => a.date.localeCompare(b.date) || a.checkId - b.checkId);
}

export function IssueCertificates({ onIssued }: { onIssued: () => void }) {
  const api = useLab();
  const [progress, setProgress] = useState<Progress>({ kind: 'idle' });
  const stop = useRef(false);

  async function run() {
    stop.current = false;
    setProgress({
      kind: 'running',
      done: 0,
      total: 0,
      what: 'finding signed checks without a certificate',
      stopping: false,
    });
    let todo;
    try {
      todo = await checksWithoutCertificate(api);
    } catch (e) {
      setProgress({
        kind: 'failed',
        text: `The checks could not be listed: ${messageOf(e)}. Nothing was issued.`,
      });
      return;
    }
    if (todo.length === 0) {
      setProgress({ kind: 'finished', text: 'Every signed check already has its certificate.' });
      return;
    }
    const issued: string[] = [];
    for (const c of todo) {
      if (stop.current) {
        setProgress({
          kind: 'stopped',
          text: `Stopped: ${issued.length} of ${todo.length} certificates issued (${issued.join(', ') || 'none'}); the rest were not.`,
        });
        onIssued();
        return;
      }
      setProgress((p) => ({
        kind: 'running',
        done: issued.length,
        total: todo.length,
        what: `check ${c.checkId} of ${c.meter} (${c.date})`,
        stopping: p.kind === 'running' && p.stopping,
      }));
      try {
        const d = await api.issueCertificate({ checkId: c.checkId });
        issued.push(d.number);
      } catch (e) {
        setProgress({
          kind: 'failed',
          text: `Check ${c.checkId} of ${c.meter}: ${messageOf(e)}. ${issued.length} certificates were issued before it (${issued.join(', ') || 'none'}); none after.`,
        });
        onIssued();
        return;
      }
    }
    setProgress({ kind: 'finished', text: `${issued.length} certificates issued: ${issued.join(', ')}.` });
    onIssued();
  }

  const running = progress.kind === 'running';
  return (
    <div className="subform" data-testid="issue-batch">
      <p>
        Issue the certificate of every signed check that has none yet, one after another. Stopping lets the
        one under way finish.
      </p>
      <div className="actions">
        <button
          type="button"
          className="button"
          aria-disabled={running}
          onClick={() => !running && void run()}
        >
          Issue the missing certificates
        </button>
        {running && (
          <button
            type="button"
            className="button"
            aria-disabled={progress.stopping}
            onClick={() => {
              stop.current = true;
              setProgress((p) => (p.kind === 'running' ? { ...p, stopping: true } : p));
            }}
          >
            Stop
          </button>
        )}
      </div>
      <ProgressLine progress={progress} unit="certificates" />
    </div>
  );
}
