// "Log this use" on a fit-for-use answer: what the meter is used for, recorded with who (the
// signed-in person) and when (the clock) by the logUse operation, so the people who relied on it
// can be found if it is later found off.
import { useId, useState } from 'react';
import type { UseRecord } from '../../../app/api/contract-impact';
import { formatHz } from '../shared/format';
import { messageOf } from '../shared/useLoad';
import { useLab } from '../lab/LabContext';

type State =
  | { kind: 'idle' }
  | { kind: 'busy' }
  | { kind: 'failed'; message: string }
  | { kind: 'logged'; use: UseRecord };

export function LogUse({ assetId, frequencyHz }: { assetId: string; frequencyHz: number }) {
  const api = useLab();
  const id = useId();
  const [purpose, setPurpose] = useState('');
  const [state, setState] = useState<State>({ kind: 'idle' });

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setState({ kind: 'busy' });
    try {
      const use = await api.logUse({ meter: assetId, at: `${frequencyHz} Hz`, purpose: purpose.trim() });
      setState({ kind: 'logged', use });
      setPurpose('');
    } catch (err) {
      setState({ kind: 'failed', message: messageOf(err) });
    }
  }

  return (
    <form className="toolbar log-use" onSubmit={(e) => void submit(e)} noValidate>
      <label htmlFor={id}>What it is used for</label>
      <input
        id={id}
        type="text"
        placeholder="e.g. job 4471, filter tuning"
        value={purpose}
        onChange={(e) => setPurpose(e.target.value)}
      />
      <button type="submit" className="button" disabled={state.kind === 'busy'}>
        Log this use
      </button>
      <span role="status">
        {state.kind === 'logged' &&
          `Logged: ${state.use.assetId} at ${formatHz(state.use.frequencyHz, 4)} by ${state.use.usedBy}, ${state.use.usedAt}`}
        {state.kind === 'failed' && <span className="error">{state.message}</span>}
      </span>
    </form>
  );
}
