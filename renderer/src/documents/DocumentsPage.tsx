// Issued documents and their verification: the certificates and check-sheets this lab issued,
// and a check of a PDF someone hands back — picked or dropped, read in the window, and sent as
// its bytes (base64) to the lab, which compares it with itself and with what was recorded.
import { useEffect, useState } from 'react';
import type { FindingStatus, VerifyReport } from '../../../app/api/contract-documents';
import { IssueCertificates } from '../settings/LongWork';
import { href } from '../shared/routes';
import { messageOf, useLoad } from '../shared/useLoad';
import { useLab } from '../lab/LabContext';
import { DccDownload } from './DccDownload';
import './documents.css';

export const FINDING_WORD: Record<FindingStatus, string> = {
  ok: '✓ ok',
  fail: '✗ FAIL',
  'not-checked': '– not checked',
};

/** Bytes to base64 in slices, so a large PDF does not overflow the argument list. */
export function bytesToBase64(bytes: Uint8Array): string {
  let text = '';
  for (let i = 0; i < bytes.length; i += 0x8000)
    text += String.fromCharCode(...bytes.subarray(i, i + 0x8000));
  return btoa(text);
}

type Check =
  | { kind: 'idle' }
  | { kind: 'busy'; name: string }
  | { kind: 'done'; name: string; report: VerifyReport }
  | { kind: 'failed'; name: string; message: string };

export function DocumentsPage() {
  const api = useLab();
  const [load, reload] = useLoad(() => api.listDocuments({}), [api]);
  const [check, setCheck] = useState<Check>({ kind: 'idle' });
  const [over, setOver] = useState(false);
  useEffect(() => {
    document.title = 'Documents · Dipledger';
  }, []);

  async function verify(file: File) {
    setCheck({ kind: 'busy', name: file.name });
    try {
      const bytes = new Uint8Array(await file.arrayBuffer());
      const report = await api.verifyDocument({ pdfBase64: bytesToBase64(bytes) });
      setCheck({ kind: 'done', name: file.name, report });
    } catch (e) {
      setCheck({ kind: 'failed', name: file.name, message: messageOf(e) });
    }
  }

  return (
    <div className="page documents-page">
      <header className="masthead">
        <h1>Documents</h1>
        <p className="subtitle">
          Certificates and check-sheets issued by this lab, and a check of one handed back.
        </p>
      </header>

      <section aria-labelledby="verify-title">
        <h2 id="verify-title">Verify a document</h2>
        <div
          className={over ? 'drop-zone over' : 'drop-zone'}
          data-testid="drop-zone"
          onDragOver={(e) => {
            e.preventDefault();
            setOver(true);
          }}
          onDragLeave={() => setOver(false)}
          onDrop={(e) => {
            e.preventDefault();
            setOver(false);
            const f = e.dataTransfer.files[0];
            if (f) void verify(f);
          }}
        >
          <p>Drop a PDF here, or</p>
          <label className="button">
            Choose a PDF…
            <input
              type="file"
              accept="application/pdf,.pdf"
              className="visually-hidden"
              aria-label="PDF to verify"
              onChange={(e) => {
                const f = e.target.files?.[0];
                if (f) void verify(f);
                e.target.value = '';
              }}
            />
          </label>
        </div>
        <VerifyResult check={check} />
      </section>

      <section aria-labelledby="issued-title">
        <h2 id="issued-title">Issued</h2>
        <IssueCertificates onIssued={reload} />
        {load.kind === 'loading' && <p className="status">Loading the documents…</p>}
        {load.kind === 'failed' && (
          <p className="status error" role="alert">
            The documents could not be listed: {load.message}
          </p>
        )}
        {load.kind === 'ready' && load.value.length === 0 && (
          <p className="muted">
            No documents issued yet: sign a check, then issue its certificate or check-sheet.
          </p>
        )}
        {load.kind === 'ready' && load.value.length > 0 && (
          <div className="table-wrap">
            <table className="grid documents" data-testid="documents">
              <caption className="visually-hidden">Issued documents, newest first</caption>
              <thead>
                <tr>
                  <th scope="col">Number</th>
                  <th scope="col" className="num">
                    Rev.
                  </th>
                  <th scope="col">Kind</th>
                  <th scope="col">Meter</th>
                  <th scope="col" className="num">
                    Check (rev.)
                  </th>
                  <th scope="col">Issued (UTC)</th>
                  <th scope="col">By</th>
                  <th scope="col" className="num">
                    Size
                  </th>
                  <th scope="col">Status</th>
                  <th scope="col">SHA-256</th>
                </tr>
              </thead>
              <tbody>
                {load.value.map((d) => (
                  <tr key={`${d.number}/${d.revision}`}>
                    <th scope="row">{d.number}</th>
                    <td className="num">{d.revision}</td>
                    <td>
                      {d.kind}
                      {d.kind === 'certificate' && <DccDownload number={d.number} revision={d.revision} />}
                    </td>
                    <td>
                      <a href={href.meter(d.meterAssetId)}>{d.meterAssetId}</a>
                    </td>
                    <td className="num">
                      {d.checkId} ({d.checkRevision})
                    </td>
                    <td className="num-left">{d.issuedAt.replace('T', ' ').slice(0, 16)}</td>
                    <td>{d.issuedBy}</td>
                    <td className="num">{(d.byteLength / 1024).toFixed(1)} KiB</td>
                    <td>
                      {d.replacedBy
                        ? `↻ replaced by ${d.replacedBy.number} rev. ${d.replacedBy.revision}`
                        : '● current'}
                      {d.pdfSigned ? ' · 🔏 PDF-signed' : ''}
                    </td>
                    <td className="mono muted">{d.sha256.slice(0, 16)}…</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>
    </div>
  );
}

function VerifyResult({ check }: { check: Check }) {
  if (check.kind === 'idle') return null;
  if (check.kind === 'busy') return <p className="status">Verifying {check.name}…</p>;
  if (check.kind === 'failed')
    return (
      <p className="status error" role="alert">
        {check.name} could not be verified: {check.message}
      </p>
    );
  const r = check.report;
  return (
    <div className="verify-result" data-testid="verify-result">
      <p className={r.ok ? 'finding-ok' : 'finding-fail'} role="status">
        {r.ok ? '✓ Genuine:' : '✗ NOT VERIFIED:'} {check.name}
        {r.document ? ` is ${r.document.kind} ${r.document.number} revision ${r.document.revision}` : ''}
        {r.check
          ? ` of ${r.check.meter}, check ${r.check.checkId} (rev. ${r.check.revision}) on ${r.check.date}`
          : ''}
        .
      </p>
      <p className="mono muted">SHA-256 {r.sha256}</p>
      <ul className="plain findings">
        {r.findings.map((f, i) => (
          <li key={i} className={`finding-${f.status}`}>
            <strong>{FINDING_WORD[f.status]}</strong> {f.check}: {f.detail}
          </li>
        ))}
      </ul>
    </div>
  );
}
