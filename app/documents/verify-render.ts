// Whether the pages show what the embedded record says: the document is drawn again from the
// record with the same renderer and compared with the file byte for byte, outside the PDF
// signature's own value (rendering is deterministic: fixed dates, fonts embedded from the same
// files). Where they differ, the pages whose content streams differ are named, or else the
// object where the first difference lies (a font, the page tree, an attachment...).
import { inflateSync } from 'node:zlib';
import { findByteRange } from '@signpdf/utils';
import { renderCertificate } from './certificate';
import { renderCheckSheet } from './checksheet';
import { parseObjects, type PdfObject } from './pdfread';
import { documentDataOf, LAYOUT, type EmbeddedRecord } from './record';

export interface RedrawResult {
  ok: boolean;
  detail: string;
}

/** The decoded content of each page, in page order (pdfkit's flat page tree). */
function pageContents(pdf: Buffer): string[] | null {
  let objects: Map<number, PdfObject>;
  try {
    objects = parseObjects(pdf);
  } catch {
    return null;
  }
  const pages = [...objects.values()].find((o) => /\/Type \/Pages\b/.test(o.dict));
  const kids = pages && /\/Kids \[([^\]]*)\]/.exec(pages.dict)?.[1];
  if (!kids) return null;
  return [...kids.matchAll(/(\d+) 0 R/g)].map((k) => {
    const page = objects.get(Number(k[1]));
    const ref = page && /\/Contents (\d+) 0 R/.exec(page.dict)?.[1];
    const stream = ref ? objects.get(Number(ref)) : undefined;
    if (!stream?.stream) return '';
    try {
      return (/\/FlateDecode/.test(stream.dict) ? inflateSync(stream.stream) : stream.stream).toString(
        'latin1',
      );
    } catch {
      return '(damaged)';
    }
  });
}

function whereDiffers(issued: Buffer, redrawn: Buffer): string {
  const a = pageContents(issued);
  const b = pageContents(redrawn);
  if (a && b) {
    if (a.length !== b.length) return `the file has ${a.length} page(s); the record draws ${b.length}`;
    const pages = a.flatMap((c, i) => (c === b[i] ? [] : [i + 1]));
    if (pages.length)
      return `the content of page${pages.length > 1 ? 's' : ''} ${pages.join(', ')} differs from what the record draws`;
  }
  let at = 0;
  while (at < issued.length && at < redrawn.length && issued[at] === redrawn[at]) at++;
  const head = redrawn.subarray(0, at).toString('latin1');
  const obj = [...head.matchAll(/(?:^|[\r\n])(\d+) 0 obj/g)].pop()?.[1];
  return `the pages show the record's content, but the file differs from what the record draws at byte ${at}${obj ? ` (in object ${obj}: a font, the page tree or another part of the file)` : ''}`;
}

/** Draws the document again from `rec` and compares it with `pdf`, whose PDF signature has the
 * byte range `range` (null when it has none: then the whole file is compared). */
export function compareWithRedraw(
  pdf: Buffer,
  rec: EmbeddedRecord,
  range: [number, number, number, number] | null,
): RedrawResult {
  const data = documentDataOf(rec);
  if (!data)
    return {
      ok: false,
      detail:
        'the record does not carry what the pages were drawn from (a document issued before documents were signed as PDFs): the visible text cannot be compared with it',
    };
  if (rec.rendering?.layout !== LAYOUT)
    return {
      ok: false,
      detail: `the pages were drawn with layout ${rec.rendering?.layout ?? '?'}, which this version does not draw (it draws ${LAYOUT}): check it with the version that issued it`,
    };
  let redrawn: Buffer;
  try {
    redrawn = (data.issue.kind === 'certificate' ? renderCertificate : renderCheckSheet)(data).pdf;
  } catch (e) {
    return {
      ok: false,
      detail: `the pages cannot be drawn again from the record: ${e instanceof Error ? e.message : String(e)}`,
    };
  }
  // As the signing library does: no trailing newline, and the real byte range in place of the
  // placeholder (padded to its width).
  if (redrawn[redrawn.length - 1] === 0x0a) redrawn = redrawn.subarray(0, redrawn.length - 1);
  const { byteRangePlaceholder, byteRangePlaceholderPosition } = findByteRange(redrawn);
  if (range && byteRangePlaceholder !== undefined && byteRangePlaceholderPosition !== undefined) {
    const actual = `/ByteRange [${range.join(' ')}]`.padEnd(byteRangePlaceholder.length, ' ');
    redrawn = Buffer.concat([
      redrawn.subarray(0, byteRangePlaceholderPosition),
      Buffer.from(actual, 'latin1'),
      redrawn.subarray(byteRangePlaceholderPosition + byteRangePlaceholder.length),
    ]);
  }
  const same =
    redrawn.length === pdf.length &&
    (range
      ? redrawn.subarray(0, range[1] + 1).equals(pdf.subarray(0, range[1] + 1)) &&
        redrawn.subarray(range[2] - 1).equals(pdf.subarray(range[2] - 1))
      : redrawn.equals(pdf));
  if (same)
    return {
      ok: true,
      detail: `drawn again from the record (${LAYOUT}), the file is the same byte for byte outside the signature value: the pages show the record`,
    };
  return { ok: false, detail: whereDiffers(pdf, redrawn) };
}
