// The lab standards: the traceable sources and counters checks are made against, each with its
// current certificate and due date, and its earlier certificates on request.
import { Fragment, useEffect, useState } from 'react';
import type { Standard } from '../../../app/api/contract';
import { dueStatus, formatDays } from '../shared/format';
import { useLoad } from '../shared/useLoad';
import './standards.css';
import { useLab } from '../lab/LabContext';

export function StandardsPage() {
  const api = useLab();
  const [load] = useLoad(() => api.listStandards(), [api]);
  const [open, setOpen] = useState<string | null>(null);
  useEffect(() => {
    document.title = 'Lab standards · Dipledger';
  }, []);
  return (
    <div className="page">
      <header className="masthead">
        <h1>Lab standards</h1>
        <p className="subtitle">Traceable sources and counters, their certificates and when they fall due</p>
      </header>
      {load.kind === 'loading' && <p className="status">Loading the standards…</p>}
      {load.kind === 'failed' && (
        <p className="status error" role="alert">
          The standards could not be loaded: {load.message}
        </p>
      )}
      {load.kind === 'ready' && load.value.length === 0 && <p className="muted">No lab standards yet.</p>}
      {load.kind === 'ready' && load.value.length > 0 && (
        <div className="table-wrap">
          <table className="grid standards">
            <caption className="visually-hidden">Lab standards and their current certificates</caption>
            <thead>
              <tr>
                <th scope="col">Asset id</th>
                <th scope="col">Description</th>
                <th scope="col">Certificate</th>
                <th scope="col">Issued by</th>
                <th scope="col" className="num">
                  Calibrated
                </th>
                <th scope="col" className="num">
                  Due date
                </th>
                <th scope="col" className="num">
                  Days to due
                </th>
                <th scope="col" className="num">
                  U (k)
                </th>
                <th scope="col">
                  <span className="visually-hidden">History</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {load.value.map((s) => (
                <Fragment key={s.assetId}>
                  <StandardRow
                    s={s}
                    open={open === s.assetId}
                    onToggle={() => setOpen(open === s.assetId ? null : s.assetId)}
                  />
                  {open === s.assetId && (
                    <tr className="detail-row">
                      <td colSpan={9}>
                        <History s={s} />
                      </td>
                    </tr>
                  )}
                </Fragment>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <p className="footnote">
        U is the relative expanded uncertainty of the standard’s frequency from its certificate, with its
        coverage factor k. A check may use a standard only on dates its certificate covers.
      </p>
    </div>
  );
}

function StandardRow({ s, open, onToggle }: { s: Standard; open: boolean; onToggle: () => void }) {
  const c = s.certificates[0];
  const due = dueStatus(c ? s.daysToDue : null);
  return (
    <tr className={`due-${due}`} data-standard={s.assetId}>
      <th scope="row" className="asset">
        {s.assetId}
      </th>
      <td className="wrap">{s.description}</td>
      <td>{c?.certificateId ?? '—'}</td>
      <td className="wrap narrow">{c?.issuedBy ?? '—'}</td>
      <td className="num">{c?.calibratedOn ?? '—'}</td>
      <td className="num">{s.dueOn || '—'}</td>
      <td className={`num days days-${due}`}>
        {due === 'overdue' ? (
          <strong>
            <span aria-hidden="true">⚠ </span>
            {formatDays(s.daysToDue)}, expired
          </strong>
        ) : (
          formatDays(c ? s.daysToDue : null)
        )}
      </td>
      <td className="num">{c ? `${c.expandedUncertaintyPpm} ppm (${c.coverageFactor})` : '—'}</td>
      <td>
        <button type="button" className="link" aria-expanded={open} onClick={onToggle}>
          {open ? 'Hide' : `${s.certificates.length} certificates`}
        </button>
      </td>
    </tr>
  );
}

function History({ s }: { s: Standard }) {
  return (
    <table className="grid history">
      <thead>
        <tr>
          <th scope="col">Certificate</th>
          <th scope="col">Issued by</th>
          <th scope="col" className="num">
            Calibrated
          </th>
          <th scope="col" className="num">
            Due date
          </th>
          <th scope="col" className="num">
            U (k)
          </th>
        </tr>
      </thead>
      <tbody>
        {s.certificates.map((c) => (
          <tr key={c.certificateId}>
            <td>{c.certificateId}</td>
            <td>{c.issuedBy}</td>
            <td className="num">{c.calibratedOn}</td>
            <td className="num">{c.dueOn}</td>
            <td className="num">
              {c.expandedUncertaintyPpm} ppm ({c.coverageFactor})
            </td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}
