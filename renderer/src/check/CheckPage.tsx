// One check as it is signed and issued: its points and verdicts, who signed it with what meaning,
// the next signature it waits for (name and passphrase, the two components of an electronic
// signature), and, once signed, its check-sheet and certificate. Recording a check ends here.
import { useEffect, useId, useRef, useState } from 'react';
import type { LabApi } from '../../../app/api/contract';
import type { IssuedDocument, IssuedDocumentFile } from '../../../app/api/contract-documents';
import type { CheckRevisionView, Signer } from '../../../app/api/contract-records';
import type { FieldIssue } from '../../../app/api/errors';
import { Cautions } from '../shared/Cautions';
import { Problems } from '../shared/Problems';
import { VERDICT_LABEL, formatPpm } from '../shared/format';
import { revisionWord } from '../meter/MeterRecords';
import { href } from '../shared/routes';
import { usePdfUrl } from '../meter/WorksheetButton';
import { messageOf, useLoad } from '../shared/useLoad';
import { useLab } from '../lab/LabContext';
import { focusQuietly, markProblems, useAnnounce } from '../shared/a11y';
import './check.css';

interface Loaded {
  view: CheckRevisionView;
  signers: Signer[];
  documents: IssuedDocument[];
}

async function loadCheck(api: LabApi, checkId: number): Promise<Loaded> {
  const [view, signers, documents] = await Promise.all([
    api.getCheckRevision({ checkId }),
    api.listSigners(),
    api.listDocuments({ checkId }),
  ]);
  return { view, signers, documents };
}

const MEANING_WORD = { performed: 'performed', reviewed: 'reviewed', approved: 'approved' } as const;

export function CheckPage({ checkId }: { checkId: number }) {
  const api = useLab();
  const [load, reload] = useLoad(() => loadCheck(api, checkId), [api, checkId]);
  useEffect(() => {
    document.title = `Check ${checkId} · Dipledger`;
  }, [checkId]);
  return (
    <div className="page check-page">
      {load.kind === 'loading' && <p className="status">Loading check {checkId}…</p>}
      {load.kind === 'failed' && (
        <p className="status error" role="alert">
          Check {checkId} could not be loaded: {load.message}
        </p>
      )}
      {load.kind === 'ready' && <CheckView loaded={load.value} onChanged={reload} />}
      <Cautions />
    </div>
  );
}

function CheckView({ loaded, onChanged }: { loaded: Loaded; onChanged: () => void }) {
  const { view, signers, documents } = loaded;
  const rec = view.record;
  const meanings = view.signatures.map((s) => s.meaning);
  const verdict = rec.asLeftVerdict ?? rec.asFoundVerdict;
  return (
    <>
      <header className="masthead">
        <h1>
          Check {rec.checkId} of <a href={href.meter(rec.meterAssetId)}>{rec.meterAssetId}</a>
        </h1>
        <p className="subtitle" data-testid="check-state">
          {rec.date} · performed by {rec.performer} · revision {rec.revision} ·{' '}
          <strong>{revisionWord(rec, meanings)}</strong>
          {verdict && (
            <>
              {' '}
              · verdict{' '}
              <span className={`verdict v-${verdict}`} data-testid="check-verdict">
                {VERDICT_LABEL[verdict].symbol} {VERDICT_LABEL[verdict].word}
              </span>
            </>
          )}
        </p>
      </header>

      <section className="panel" aria-labelledby="points-h">
        <h2 id="points-h">Points</h2>
        <div className="table-wrap">
          <table className="grid check-points">
            <thead>
              <tr>
                <th scope="col">Phase</th>
                <th scope="col" className="num">
                  Reference / GHz
                </th>
                <th scope="col" className="num">
                  Error / ppm
                </th>
                <th scope="col" className="num">
                  U / ppm (k)
                </th>
                <th scope="col">Verdict</th>
              </tr>
            </thead>
            <tbody>
              {rec.points.map((p) => {
                const v = VERDICT_LABEL[p.result.decision.verdict];
                return (
                  <tr key={p.seq}>
                    <td>{p.phase}</td>
                    <td className="num">{(p.referenceHz / 1e9).toFixed(6)}</td>
                    <td className="num">{formatPpm(p.result.errorPpm).replace(' ppm', '')}</td>
                    <td className="num">
                      {p.result.expandedPpm.toFixed(1)} ({p.result.budget.coverageFactor.toFixed(2)})
                    </td>
                    <td className={`verdict v-${p.result.decision.verdict}`}>
                      {v.symbol} {v.word}
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
        {view.traceabilityExceptions.length > 0 && (
          <p className="warn-inline" role="note">
            <span aria-hidden="true">⚠ </span>Traceability exceptions:{' '}
            {view.traceabilityExceptions.join('; ')}
          </p>
        )}
      </section>

      <SigningPanel view={view} signers={signers} onSigned={onChanged} />
      <IssuePanel view={view} documents={documents} onIssued={onChanged} />
    </>
  );
}

function SigningPanel(props: { view: CheckRevisionView; signers: Signer[]; onSigned: () => void }) {
  const { view, signers, onSigned } = props;
  const api = useLab();
  const personId = useId();
  const passId = useId();
  const [person, setPerson] = useState('');
  const [passphrase, setPassphrase] = useState('');
  const [state, setState] = useState<
    { kind: 'idle' } | { kind: 'busy' } | { kind: 'failed'; message: string; issues: FieldIssue[] }
  >({ kind: 'idle' });
  const next = view.awaiting;
  const newest = view.revisions.at(-1)?.revision === view.record.revision;
  const announce = useAnnounce();
  const headingRef = useRef<HTMLHeadingElement>(null);
  const formRef = useRef<HTMLFormElement>(null);
  const problemsId = useId();

  // A refusal marks the signer or passphrase box it names and focuses it (or the message).
  useEffect(() => {
    const root = formRef.current;
    if (state.kind !== 'failed' || !root) return;
    return markProblems(
      root,
      state.issues.map((i) => ({ field: i.field, messageId: problemsId })),
      root.ownerDocument.getElementById(problemsId),
    );
  }, [state, problemsId]);

  async function sign(e: React.FormEvent) {
    e.preventDefault();
    // The button stays focusable (aria-disabled): pressing it early says what is missing.
    if (state.kind === 'busy') return;
    if (person === '' || passphrase === '') {
      const issues: FieldIssue[] = [];
      if (person === '')
        issues.push({ field: 'person', value: '', expected: 'a signer', message: 'Choose the signer.' });
      if (passphrase === '')
        issues.push({
          field: 'passphrase',
          value: '',
          expected: 'the passphrase',
          message: 'Type the signer’s passphrase.',
        });
      setState({ kind: 'failed', message: 'Choose the signer and type the passphrase.', issues });
      return;
    }
    setState({ kind: 'busy' });
    try {
      await api.signCheck({ checkId: view.record.checkId, person, passphrase, meaning: next ?? undefined });
      setPassphrase('');
      setState({ kind: 'idle' });
      announce(`Check ${view.record.checkId} signed as ${MEANING_WORD[next ?? 'performed']} by ${person}.`);
      // The form goes once signed: focus moves to the list of signatures that now holds it.
      focusQuietly(headingRef.current);
      onSigned();
    } catch (err) {
      // The passphrase is cleared on every attempt: it is never kept longer than one try.
      setPassphrase('');
      setState({
        kind: 'failed',
        message: messageOf(err),
        issues: (err as { issues?: FieldIssue[] }).issues ?? [],
      });
    }
  }

  return (
    <section className="panel" aria-labelledby="sign-h">
      <h2 id="sign-h" ref={headingRef}>
        Signatures
      </h2>
      {view.signatures.length === 0 ? (
        <p className="muted">
          Not signed yet. The first signature locks this revision; a correction is always a new revision with
          its reason.
        </p>
      ) : (
        <ol className="plain signatures" data-testid="signatures">
          {view.signatures.map((s) => (
            <li key={s.seq}>
              <span aria-hidden="true">✔ </span>
              <strong>{MEANING_WORD[s.meaning]}</strong> by {s.printedName} ({s.role}) at{' '}
              {s.signedAt.replace('T', ' ').replace(/\.\d+Z$/, ' UTC')} · key {s.keyFingerprint.slice(0, 16)}…
            </li>
          ))}
        </ol>
      )}
      {next && newest ? (
        signers.length === 0 ? (
          <p className="status">
            No one in this lab has a signing key yet: enrol one in <a href={href.settings()}>Settings</a>.
          </p>
        ) : (
          <form
            ref={formRef}
            className="sign-form"
            onSubmit={(e) => void sign(e)}
            noValidate
            aria-label="Sign this check"
          >
            <p>
              This revision waits for the signature meaning <strong>{MEANING_WORD[next]}</strong>. Signing
              locks it: later changes become a new revision with a reason.
            </p>
            <div className="row">
              <div className="field">
                <label htmlFor={personId}>Signer</label>
                <select
                  id={personId}
                  data-field="person"
                  value={person}
                  onChange={(e) => setPerson(e.target.value)}
                  required
                >
                  <option value="">Choose…</option>
                  {signers.map((s) => (
                    <option key={s.person.id} value={s.person.name}>
                      {s.person.name} ({s.person.role})
                    </option>
                  ))}
                </select>
              </div>
              <div className="field">
                <label htmlFor={passId}>Passphrase</label>
                <input
                  id={passId}
                  data-field="passphrase"
                  type="password"
                  autoComplete="off"
                  value={passphrase}
                  onChange={(e) => setPassphrase(e.target.value)}
                />
              </div>
            </div>
            <div className="actions">
              <button type="submit" className="button primary" aria-disabled={state.kind === 'busy'}>
                {state.kind === 'busy' ? 'Signing…' : `Sign as ${MEANING_WORD[next]}`}
              </button>
            </div>
            {state.kind === 'failed' && <Problems verb="Not signed" state={state} id={problemsId} />}
          </form>
        )
      ) : (
        <p className="status" data-testid="sign-done">
          {newest
            ? '✔ Reviewed: nothing more is needed before issuing.'
            : 'A newer revision exists: sign that one.'}
        </p>
      )}
    </section>
  );
}

type IssueKind = 'sheet' | 'certificate';

function IssuePanel(props: { view: CheckRevisionView; documents: IssuedDocument[]; onIssued: () => void }) {
  const { view, documents, onIssued } = props;
  const api = useLab();
  const reasonId = useId();
  const [reason, setReason] = useState('');
  const [state, setState] = useState<
    | { kind: 'idle' }
    | { kind: 'busy'; what: IssueKind }
    | { kind: 'issued'; file: IssuedDocumentFile }
    | { kind: 'failed'; message: string; issues: FieldIssue[] }
  >({ kind: 'idle' });
  const signed = view.effectiveRevision !== null;
  // The button's word and the stored kind differ: a sheet is stored as 'check-sheet'.
  const STORED_KIND = { sheet: 'check-sheet', certificate: 'certificate' } as const satisfies Record<
    IssueKind,
    IssuedDocument['kind']
  >;
  const has = (k: IssueKind) => documents.some((d) => d.kind === STORED_KIND[k]);

  const announce = useAnnounce();

  async function issue(what: IssueKind) {
    if (state.kind === 'busy') return;
    setState({ kind: 'busy', what });
    const input = {
      checkId: view.record.checkId,
      ...(has(what) && reason.trim() !== '' ? { replaceReason: reason.trim() } : {}),
    };
    try {
      const file = what === 'certificate' ? await api.issueCertificate(input) : await api.issueSheet(input);
      setState({ kind: 'issued', file });
      announce(`${file.kind === 'certificate' ? 'Certificate' : 'Check-sheet'} ${file.number} issued.`);
      setReason('');
      onIssued();
    } catch (err) {
      setState({
        kind: 'failed',
        message: messageOf(err),
        issues: (err as { issues?: FieldIssue[] }).issues ?? [],
      });
    }
  }

  return (
    <section className="panel" aria-labelledby="issue-h">
      <h2 id="issue-h">Documents</h2>
      {!signed ? (
        <p className="muted">A check-sheet and a certificate can be issued once the check is signed.</p>
      ) : (
        <>
          {documents.length > 0 && (
            <ul className="plain" data-testid="check-documents">
              {documents.map((d) => (
                <li key={`${d.number}/${d.revision}`}>
                  {d.kind === 'certificate' ? 'Certificate' : 'Check-sheet'} <strong>{d.number}</strong> rev.{' '}
                  {d.revision}, issued {d.issuedAt.slice(0, 10)}
                </li>
              ))}
            </ul>
          )}
          {(has('sheet') || has('certificate')) && (
            <div className="field wide">
              <label htmlFor={reasonId}>Why a replacement (needed to issue a document again)</label>
              <input id={reasonId} type="text" value={reason} onChange={(e) => setReason(e.target.value)} />
            </div>
          )}
          <div className="actions">
            <button
              type="button"
              className="button"
              aria-disabled={state.kind === 'busy'}
              onClick={() => void issue('sheet')}
            >
              {has('sheet') ? 'Issue a replacement check-sheet' : 'Issue the check-sheet'}
            </button>
            <button
              type="button"
              className="button primary"
              aria-disabled={state.kind === 'busy'}
              onClick={() => void issue('certificate')}
            >
              {has('certificate') ? 'Issue a replacement certificate' : 'Issue the certificate'}
            </button>
            <span role="status" className="status">
              {state.kind === 'busy' &&
                `Issuing the ${state.what === 'sheet' ? 'check-sheet' : 'certificate'}…`}
            </span>
          </div>
          {state.kind === 'issued' && <IssuedFile file={state.file} />}
          {state.kind === 'failed' && <Problems verb="Not issued" state={state} />}
        </>
      )}
    </section>
  );
}

function IssuedFile({ file }: { file: IssuedDocumentFile }) {
  const url = usePdfUrl(file.pdfBase64);
  const name = `${file.number}${file.revision > 1 ? `-rev${file.revision}` : ''}.pdf`;
  return (
    <p className="status ok" data-testid="issued">
      ✓ Issued {file.kind === 'certificate' ? 'certificate' : 'check-sheet'} <strong>{file.number}</strong>
      {url && (
        <>
          {' '}
          ·{' '}
          <a href={url} download={name}>
            Save {name}
          </a>
        </>
      )}
    </p>
  );
}
