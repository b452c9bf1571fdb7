// @vitest-environment happy-dom
// The DCC on a certificate's row in Documents: asked for by number and revision when clicked,
// handed to the browser as an XML download under the name the certificate carries it by, and a
// refusal (a certificate issued before certificates carried a DCC) told beside the button.
import { cleanup, fireEvent, render, screen, waitFor } from '@testing-library/react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import type { DccQuery } from '../../app/api/contract-dcc';
import { LabError } from '../../app/api/errors';
import { DccDownload } from '../../renderer/src/documents/DccDownload';
import { LabProvider } from '../../renderer/src/lab/LabContext';
import { fakeLabApi } from '../e2e/fixtures/fakeLab';

afterEach(() => {
  cleanup();
  vi.restoreAllMocks();
});

const XML = '<?xml version="1.0" encoding="UTF-8"?>\n<dcc:digitalCalibrationCertificate/>';

describe('DCC download on a certificate row', () => {
  it('asks for the DCC of that certificate and downloads it as XML under its own name', async () => {
    const asked: DccQuery[] = [];
    const api = fakeLabApi({
      getDcc: (q) => {
        asked.push(q);
        return Promise.resolve({
          number: 'C-2026-0007',
          revision: 2,
          checkId: 12,
          checkRevision: 1,
          fileName: 'C-2026-0007-r2-dcc.xml',
          sha256: 'ab'.repeat(32),
          xml: XML,
        });
      },
    });
    const blobs: Blob[] = [];
    const created = vi.spyOn(URL, 'createObjectURL').mockImplementation((b) => {
      blobs.push(b as Blob);
      return 'blob:dcc';
    });
    vi.spyOn(URL, 'revokeObjectURL').mockImplementation(() => undefined);
    const clicked: { href: string; download: string }[] = [];
    vi.spyOn(HTMLAnchorElement.prototype, 'click').mockImplementation(function (this: HTMLAnchorElement) {
      clicked.push({ href: this.href, download: this.download });
    });
    render(
      <LabProvider api={api}>
        <DccDownload number="C-2026-0007" revision={2} />
      </LabProvider>,
    );
    fireEvent.click(screen.getByRole('button', { name: 'Download the DCC (XML) of C-2026-0007 revision 2' }));
    await waitFor(() => expect(clicked).toEqual([{ href: 'blob:dcc', download: 'C-2026-0007-r2-dcc.xml' }]));
    expect(asked).toEqual([{ number: 'C-2026-0007', revision: 2 }]);
    expect(created).toHaveBeenCalledTimes(1);
    expect(blobs[0]?.type).toBe('application/xml');
    expect(await blobs[0]?.text()).toBe(XML);
  });

  it('tells a refusal in words', async () => {
    const api = fakeLabApi({
      getDcc: () =>
        Promise.reject(
          new LabError(
            'refused',
            'certificate C-2025-0001 revision 1 was issued before certificates carried a DCC',
          ),
        ),
    });
    render(
      <LabProvider api={api}>
        <DccDownload number="C-2025-0001" revision={1} />
      </LabProvider>,
    );
    fireEvent.click(screen.getByRole('button', { name: /Download the DCC/ }));
    expect((await screen.findByRole('alert')).textContent).toContain(
      'certificate C-2025-0001 revision 1 was issued before certificates carried a DCC',
    );
  });
});
