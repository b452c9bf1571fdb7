// The lab's people and their signing keys, in the settings: who may perform, review or administer,
// and who can sign. A key is made here with a passphrase typed twice; the passphrase seals the key
// and is never stored, shown or sent anywhere but to the one enrolment call.
import { useId, useState } from 'react';
import type { LabApi, Person } from '../../../app/api/contract';
import type { Signer } from '../../../app/api/contract-records';
import type { FieldIssue } from '../../../app/api/errors';
import { messageOf, useLoad } from '../shared/useLoad';
import { useLab } from '../lab/LabContext';

/** As the service requires for a new key (app/signing/keys.ts). */
const MIN_PASSPHRASE = 10;
const ROLES: Person['role'][] = ['technician', 'reviewer', 'administrator'];

type Status =
  | { kind: 'idle' }
  | { kind: 'busy' }
  | { kind: 'done'; text: string }
  | { kind: 'failed'; message: string; issues: FieldIssue[] };

async function loadPeople(api: LabApi): Promise<{ people: Person[]; signers: Signer[] }> {
  const [people, signers] = await Promise.all([api.listPeople(), api.listSigners()]);
  return { people, signers };
}

export function PeopleSection() {
  const api = useLab();
  const [load, reload] = useLoad(() => loadPeople(api), [api]);
  return (
    <section className="step people" aria-labelledby="people-h">
      <h2 id="people-h" className="legend-like">
        People and signing keys
      </h2>
      {load.kind === 'loading' && <p className="status">Loading people…</p>}
      {load.kind === 'failed' && (
        <p className="status error" role="alert">
          People could not be loaded: {load.message}
        </p>
      )}
      {load.kind === 'ready' && (
        <>
          <PeopleTable people={load.value.people} signers={load.value.signers} />
          <div className="people-forms">
            <AddPerson onDone={reload} />
            <EnrolKey people={load.value.people} signers={load.value.signers} onDone={reload} />
          </div>
        </>
      )}
    </section>
  );
}

function PeopleTable({ people, signers }: { people: Person[]; signers: Signer[] }) {
  const keyOf = new Map(signers.map((s) => [s.person.id, s]));
  return (
    <div className="table-wrap">
      <table className="grid people-table" data-testid="people">
        <thead>
          <tr>
            <th scope="col">Name</th>
            <th scope="col">Role</th>
            <th scope="col">Signing key</th>
          </tr>
        </thead>
        <tbody>
          {people.map((p) => {
            const k = keyOf.get(p.id);
            return (
              <tr key={p.id} data-person={p.name}>
                <th scope="row">{p.name}</th>
                <td>{p.role}</td>
                <td>
                  {k ? (
                    <>
                      <span aria-hidden="true">✓ </span>enrolled {k.enrolledAt.slice(0, 10)} ·{' '}
                      <span className="mono">{k.keyFingerprint.slice(0, 16)}…</span>
                    </>
                  ) : (
                    <span className="muted">— none: cannot sign</span>
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

function AddPerson({ onDone }: { onDone: () => void }) {
  const api = useLab();
  const nameId = useId();
  const roleId = useId();
  const [name, setName] = useState('');
  const [role, setRole] = useState<Person['role']>('technician');
  const [status, setStatus] = useState<Status>({ kind: 'idle' });

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setStatus({ kind: 'busy' });
    try {
      const p = await api.createPerson({ name, role });
      setName('');
      setStatus({ kind: 'done', text: `✓ ${p.name} added as ${p.role}.` });
      onDone();
    } catch (err) {
      setStatus(failed(err));
    }
  }

  return (
    <form className="subform" onSubmit={(e) => void submit(e)} noValidate aria-label="Add a person">
      <h3>Add a person</h3>
      <div className="row">
        <div className="field">
          <label htmlFor={nameId}>Full name</label>
          <input id={nameId} type="text" value={name} onChange={(e) => setName(e.target.value)} />
        </div>
        <div className="field">
          <label htmlFor={roleId}>Role</label>
          <select id={roleId} value={role} onChange={(e) => setRole(e.target.value as Person['role'])}>
            {ROLES.map((r) => (
              <option key={r} value={r}>
                {r}
              </option>
            ))}
          </select>
        </div>
      </div>
      <div className="actions">
        <button type="submit" className="button" disabled={status.kind === 'busy'}>
          Add the person
        </button>
      </div>
      <StatusLine status={status} verb="Not added" />
    </form>
  );
}

function EnrolKey(props: { people: Person[]; signers: Signer[]; onDone: () => void }) {
  const { people, signers, onDone } = props;
  const api = useLab();
  const whoId = useId();
  const passId = useId();
  const againId = useId();
  const withKey = new Set(signers.map((s) => s.person.id));
  const candidates = people.filter((p) => !withKey.has(p.id));
  const [who, setWho] = useState('');
  const [passphrase, setPassphrase] = useState('');
  const [again, setAgain] = useState('');
  const [status, setStatus] = useState<Status>({ kind: 'idle' });
  const tooShort = [...passphrase].length < MIN_PASSPHRASE;
  const mismatch = again !== '' && again !== passphrase;

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    if (mismatch) return;
    setStatus({ kind: 'busy' });
    try {
      const s = await api.enrolSigner({ name: who, passphrase });
      setStatus({
        kind: 'done',
        text: `✓ ${s.person.name} can sign; key ${s.keyFingerprint.slice(0, 16)}….`,
      });
      setWho('');
      onDone();
    } catch (err) {
      setStatus(failed(err));
    } finally {
      // Never kept beyond the one call.
      setPassphrase('');
      setAgain('');
    }
  }

  if (candidates.length === 0)
    return (
      <div className="subform">
        <h3>Give a signing key</h3>
        <p className="muted">Everyone listed has a signing key. Add a person first to give another.</p>
      </div>
    );
  return (
    <form className="subform" onSubmit={(e) => void submit(e)} noValidate aria-label="Give a signing key">
      <h3>Give a signing key</h3>
      <div className="row">
        <div className="field">
          <label htmlFor={whoId}>Person</label>
          <select id={whoId} value={who} onChange={(e) => setWho(e.target.value)}>
            <option value="">Choose…</option>
            {candidates.map((p) => (
              <option key={p.id} value={p.name}>
                {p.name} ({p.role})
              </option>
            ))}
          </select>
        </div>
        <div className="field">
          <label htmlFor={passId}>Passphrase (at least {MIN_PASSPHRASE} characters)</label>
          <input
            id={passId}
            type="password"
            autoComplete="new-password"
            value={passphrase}
            aria-invalid={passphrase !== '' && tooShort}
            onChange={(e) => setPassphrase(e.target.value)}
          />
        </div>
        <div className="field">
          <label htmlFor={againId}>Passphrase again</label>
          <input
            id={againId}
            type="password"
            autoComplete="new-password"
            value={again}
            aria-invalid={mismatch}
            onChange={(e) => setAgain(e.target.value)}
          />
        </div>
      </div>
      {mismatch && (
        <p className="field-problem" role="status">
          <span aria-hidden="true">✗ </span>the two passphrases differ
        </p>
      )}
      <p className="hint">
        Only the person who will sign should type it. It seals the key and is never stored: a forgotten
        passphrase cannot be recovered.
      </p>
      <div className="actions">
        <button
          type="submit"
          className="button"
          disabled={status.kind === 'busy' || who === '' || tooShort || again !== passphrase}
        >
          Make the signing key
        </button>
      </div>
      <StatusLine status={status} verb="No key made" />
    </form>
  );
}

function failed(err: unknown): Status {
  return { kind: 'failed', message: messageOf(err), issues: (err as { issues?: FieldIssue[] }).issues ?? [] };
}

function StatusLine({ status, verb }: { status: Status; verb: string }) {
  if (status.kind === 'busy') return <p className="status">Working…</p>;
  if (status.kind === 'done')
    return (
      <p role="status" className="status ok">
        {status.text}
      </p>
    );
  if (status.kind === 'failed')
    return (
      <p role="alert" className="status error">
        <strong>✗ {verb}; nothing was changed.</strong>{' '}
        {status.issues.length > 0 ? status.issues.map((i) => i.message).join('; ') : status.message}
      </p>
    );
  return null;
}
