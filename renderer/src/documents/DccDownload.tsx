// The Digital Calibration Certificate (XML) of an issued certificate, offered on its row in
// Documents: asked for when clicked, handed over as a file download, and any refusal (a
// certificate issued before certificates carried a DCC) told in words beside the button.
import { useState } from 'react';
import { useLab } from '../lab/LabContext';
import { messageOf } from '../shared/useLoad';

/** Hands `text` to the browser as a download named `name`. */
function download(text: string, name: string, type: string): void {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = document.createElement('a');
  a.href = url;
  a.download = name;
  document.body.appendChild(a);
  a.click();
  a.remove();
  URL.revokeObjectURL(url);
}

export function DccDownload({ number, revision }: { number: string; revision: number }) {
  const [state, setState] = useState<
    { kind: 'idle' } | { kind: 'busy' } | { kind: 'failed'; message: string }
  >({ kind: 'idle' });
  const api = useLab();
  async function fetchDcc() {
    setState({ kind: 'busy' });
    try {
      const dcc = await api.getDcc({ number, revision });
      download(dcc.xml, dcc.fileName, 'application/xml');
      setState({ kind: 'idle' });
    } catch (e) {
      setState({ kind: 'failed', message: messageOf(e) });
    }
  }
  return (
    <span className="dcc-download">
      {' · '}
      <button
        type="button"
        className="link"
        aria-disabled={state.kind === 'busy'}
        title="Digital Calibration Certificate: the certificate's content as XML (DCC 3.1.2)"
        aria-label={`Download the DCC (XML) of ${number} revision ${revision}`}
        onClick={() => state.kind !== 'busy' && void fetchDcc()}
      >
        DCC (XML)
      </button>
      {state.kind === 'failed' && (
        <span className="status error" role="alert">
          {' '}
          {state.message}
        </span>
      )}
    </span>
  );
}
