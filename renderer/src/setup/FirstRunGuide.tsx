// The first-run guide for an empty lab: the order a coordinator sets a lab up in (identity,
// people, standards, meters, first check), each step saying whether it is done and where to do it.
import { useLab } from '../lab/LabContext';
import { useLoad } from '../shared/useLoad';
import './setup.css';

interface Progress {
  identity: boolean;
  people: boolean;
  standards: boolean;
  meters: boolean;
  checks: boolean;
}

export function FirstRunGuide({ onAddMeter }: { onAddMeter: () => void }) {
  const api = useLab();
  const [load] = useLoad(async (): Promise<Progress> => {
    const [lab, signers, standards, meters] = await Promise.all([
      api.getLab().catch(() => null),
      api.listSigners(),
      api.listStandards(),
      api.listMeters(),
    ]);
    return {
      identity: lab !== null && lab.name !== 'New laboratory',
      people: signers.length > 0,
      standards: standards.length > 0,
      meters: meters.length > 0,
      checks: meters.some((m) => m.lastCheckDate !== null),
    };
  }, [api]);
  if (load.kind !== 'ready') return null;
  const p = load.value;
  const step = (done: boolean, text: React.ReactNode) => (
    <li className={done ? 'done' : undefined}>
      {done ? '✓ ' : ''}
      {text}
    </li>
  );
  return (
    <section className="first-run" aria-labelledby="first-run-h">
      <h2 id="first-run-h">Setting up your lab</h2>
      <p>A new lab is set up in this order; each step is kept in the lab's audit trail.</p>
      <ol>
        {step(
          p.identity,
          <>
            The lab's name and address for its documents: <a href="#/settings">Settings</a>
          </>,
        )}
        {step(
          p.people,
          <>
            The people who perform and review checks, each with a signing key:{' '}
            <a href="#/settings">Settings</a>
          </>,
        )}
        {step(
          p.standards,
          <>
            The lab standards (sources, counters) with their certificates:{' '}
            <a href="#/standards">Lab standards</a>
          </>,
        )}
        {step(
          p.meters,
          <>
            The meters of the register:{' '}
            <button type="button" className="link" onClick={onAddMeter}>
              Add a meter
            </button>{' '}
            (or import the register CSV with <code>dipledger meter import</code>)
          </>,
        )}
        {step(
          p.checks,
          <>
            The first check of a meter: <a href="#/record">Record a check</a>
          </>,
        )}
      </ol>
    </section>
  );
}
