// The bench worksheet of a meter, to print before a check: asked for on the meter's page, handed
// over as a PDF to save or print (it is not an issued document and is not numbered).
import { useEffect, useState } from 'react';
import type { WorksheetFile } from '../../../app/api/contract-documents';
import { messageOf } from '../shared/useLoad';
import { useLab } from '../lab/LabContext';

/** An object URL for base64 PDF bytes, revoked when the component lets go of it. */
export function usePdfUrl(pdfBase64: string | null): string | null {
  const [url, setUrl] = useState<string | null>(null);
  useEffect(() => {
    if (pdfBase64 === null) return;
    const bytes = Uint8Array.from(atob(pdfBase64), (c) => c.charCodeAt(0));
    const u = URL.createObjectURL(new Blob([bytes], { type: 'application/pdf' }));
    setUrl(u);
    return () => URL.revokeObjectURL(u);
  }, [pdfBase64]);
  return url;
}

export function WorksheetButton({ assetId }: { assetId: string }) {
  const api = useLab();
  const [state, setState] = useState<
    | { kind: 'idle' }
    | { kind: 'busy' }
    | { kind: 'ready'; file: WorksheetFile }
    | { kind: 'failed'; message: string }
  >({ kind: 'idle' });
  const url = usePdfUrl(state.kind === 'ready' ? state.file.pdfBase64 : null);
  const name = state.kind === 'ready' ? `worksheet-${state.file.assetId}-${state.file.printedOn}.pdf` : '';
  return (
    <span className="worksheet">
      <button
        type="button"
        className="button"
        aria-disabled={state.kind === 'busy'}
        onClick={() => {
          if (state.kind === 'busy') return;
          setState({ kind: 'busy' });
          api
            .worksheet(assetId)
            .then((file) => setState({ kind: 'ready', file }))
            .catch((e: unknown) => setState({ kind: 'failed', message: messageOf(e) }));
        }}
      >
        {state.kind === 'busy' ? 'Making the worksheet…' : 'Print the bench worksheet'}
      </button>
      {state.kind === 'ready' && url && (
        <span role="status" data-testid="worksheet-ready">
          {' '}
          ✓{' '}
          <a href={url} download={name}>
            Save {name}
          </a>
        </span>
      )}
      {state.kind === 'failed' && (
        <span role="alert" className="status error">
          {' '}
          ✗ No worksheet: {state.message}
        </span>
      )}
    </span>
  );
}
