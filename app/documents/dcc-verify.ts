// What `verify` says about the DCC a certificate carries: that it is there, that it reads as a
// DCC, and that every number in it agrees with the signed record embedded beside it. A DCC whose
// numbers differ makes the document NOT VERIFIED, with each difference named.
import { DCC_MEDIA_TYPE } from './dcc';
import { compareDcc, DccReadError, readDcc } from './dcc-read';
import type { PdfContents } from './pdfread';
import type { EmbeddedRecord } from './record';

export const DCC_FINDING = 'DCC agrees with the record';

type Report = (check: string, detail: string) => void;

/** The attached DCC, if any: the XML file beside the record (named NUMBER-rN-dcc.xml). */
export function attachedDcc(contents: PdfContents): PdfContents['files'][number] | undefined {
  return contents.files.find((f) => f.name.endsWith('-dcc.xml'));
}

export function checkEmbeddedDcc(
  contents: PdfContents,
  r: EmbeddedRecord,
  ok: Report,
  fail: Report,
  skip: Report,
): void {
  const file = attachedDcc(contents);
  if (!file) {
    if (r.document.kind === 'certificate')
      skip(DCC_FINDING, 'this certificate carries no DCC (it was issued before certificates carried one)');
    return;
  }
  if (file.damaged) {
    fail(DCC_FINDING, `the attached DCC ${file.name} is damaged: its compressed data does not decode`);
    return;
  }
  let problems: string[];
  let points = 0;
  try {
    const dcc = readDcc(file.bytes);
    points = dcc.points.length;
    problems = compareDcc(dcc, r.record, r.document);
  } catch (e) {
    if (!(e instanceof DccReadError)) throw e;
    fail(DCC_FINDING, `the attached ${file.name} (${DCC_MEDIA_TYPE}) cannot be read as a DCC: ${e.message}`);
    return;
  }
  if (problems.length === 0)
    ok(
      DCC_FINDING,
      `${file.name}: the ${points} points (reference, indication, corrected indication, error, U, k, tolerance, verdict), the conditions and the statements of conformity match the signed record`,
    );
  else
    fail(
      DCC_FINDING,
      `the DCC ${file.name} differs from the signed record: ${problems.slice(0, 6).join('; ')}${problems.length > 6 ? `; and ${problems.length - 6} more` : ''}`,
    );
}
