// A meter's records as an auditor reads them: for each check its revisions, why each later one
// was made, and who signed which with what meaning; then every audit entry about the meter, its
// checks and its issued documents, newest first.
import { useState } from 'react';
import type { LabApi, MeterDetail } from '../../../app/api/contract';
import type { AuditEntryView, CheckRevisionView, RevisionSummary } from '../../../app/api/contract-records';
import { href } from '../shared/routes';
import { useLoad } from '../shared/useLoad';
import { useLab } from '../lab/LabContext';

/** How a revision reads in words and a symbol: never by colour alone. */
export function revisionWord(r: Pick<RevisionSummary, 'state'>, meanings: readonly string[]): string {
  if (r.state === 'amended') return '↻ amended';
  if (meanings.includes('approved')) return '✔✔✔ approved';
  if (meanings.includes('reviewed')) return '✔✔ reviewed';
  if (meanings.includes('performed')) return '✔ performed';
  return '✎ not signed yet';
}

async function loadRevisions(api: LabApi, detail: MeterDetail): Promise<CheckRevisionView[]> {
  return Promise.all(detail.checks.map((c) => api.getCheckRevision({ checkId: c.checkId })));
}

export function CheckRevisions({ detail }: { detail: MeterDetail }) {
  const api = useLab();
  const [load] = useLoad(() => loadRevisions(api, detail), [api, detail]);
  if (detail.checks.length === 0) return <p className="muted">No checks recorded yet.</p>;
  if (load.kind === 'loading') return <p className="status">Loading revisions and signatures…</p>;
  if (load.kind === 'failed')
    return (
      <p className="status error" role="alert">
        Revisions could not be loaded: {load.message}
      </p>
    );
  return (
    <div className="table-wrap">
      <table className="grid revisions" data-testid="revisions">
        <caption className="visually-hidden">Revisions and signatures of each check, newest first</caption>
        <thead>
          <tr>
            <th scope="col">Date</th>
            <th scope="col" className="num">
              Check
            </th>
            <th scope="col">Revisions</th>
            <th scope="col">Signatures of the newest revision</th>
          </tr>
        </thead>
        <tbody>
          {load.value.map((v) => {
            const newest = v.record.revision;
            const meanings = v.signatures.map((s) => s.meaning);
            return (
              <tr key={v.record.checkId} data-check-id={v.record.checkId}>
                <th scope="row" className="num-left">
                  {v.record.date}
                </th>
                <td className="num">
                  <a
                    href={href.check(v.record.checkId)}
                    title="Open the check to sign it or issue its documents"
                  >
                    <span className="visually-hidden">Check </span>
                    {v.record.checkId}
                    <span className="visually-hidden">, {v.record.date}</span>
                  </a>
                </td>
                <td>
                  <ul className="plain">
                    {v.revisions.map((r) => (
                      <li key={r.revision}>
                        rev. {r.revision}:{' '}
                        {r.revision === newest
                          ? revisionWord(r, meanings)
                          : revisionWord(r, r.signatures > 0 ? ['performed'] : [])}
                        {r.amendReason && (
                          <span className="muted">
                            {' '}
                            — “{r.amendReason}”{r.amendedBy ? `, ${r.amendedBy}` : ''}
                          </span>
                        )}
                        {v.effectiveRevision === r.revision && <strong> (in effect)</strong>}
                      </li>
                    ))}
                  </ul>
                </td>
                <td>
                  {v.signatures.length === 0 ? (
                    <span>none yet{v.awaiting ? `; waits for “${v.awaiting}”` : ''}</span>
                  ) : (
                    <ul className="plain">
                      {v.signatures.map((s) => (
                        <li key={s.seq}>
                          ✔ {s.meaning} by {s.printedName} ({s.role}),{' '}
                          {s.signedAt.replace('T', ' ').slice(0, 16)} UTC{' '}
                          <span className="muted mono">key {s.keyFingerprint.slice(0, 12)}…</span>
                        </li>
                      ))}
                      {v.awaiting && <li className="muted">waits for “{v.awaiting}”</li>}
                    </ul>
                  )}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

/** Every audit entry about the meter, its checks and its documents, newest first: one call. */
export async function meterAudit(api: LabApi, detail: MeterDetail): Promise<AuditEntryView[]> {
  return api.listAudit({ meter: detail.meter.assetId, limit: 1000 });
}

const SHOWN = 25;

export function AuditHistory({ detail }: { detail: MeterDetail }) {
  const api = useLab();
  const [load] = useLoad(() => meterAudit(api, detail), [api, detail]);
  const [all, setAll] = useState(false);
  if (load.kind === 'loading') return <p className="status">Loading the audit trail…</p>;
  if (load.kind === 'failed')
    return (
      <p className="status error" role="alert">
        The audit trail could not be loaded: {load.message}
      </p>
    );
  const entries = all ? load.value : load.value.slice(0, SHOWN);
  if (entries.length === 0) return <p className="muted">Nothing in the audit trail about this meter.</p>;
  return (
    <>
      <div className="table-wrap">
        <table className="grid audit" data-testid="audit">
          <caption className="visually-hidden">
            Audit entries about {detail.meter.assetId}, newest first
          </caption>
          <thead>
            <tr>
              <th scope="col" className="num">
                Entry
              </th>
              <th scope="col">When (UTC)</th>
              <th scope="col">Who</th>
              <th scope="col">What</th>
              <th scope="col">Record</th>
              <th scope="col">Chain hash</th>
            </tr>
          </thead>
          <tbody>
            {entries.map((e) => (
              <tr key={e.id}>
                <td className="num">{e.id}</td>
                <td className="mono">{e.at.replace('T', ' ').slice(0, 19)}</td>
                <td>{e.actor}</td>
                <td>{e.action}</td>
                <td>
                  {e.entity} {e.entityId}
                </td>
                <td className="mono muted">{e.hash.slice(0, 12)}…</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {load.value.length > SHOWN && (
        <button type="button" className="link" onClick={() => setAll(!all)}>
          {all ? `Show the newest ${SHOWN}` : `Show all ${load.value.length} entries`}
        </button>
      )}
    </>
  );
}
