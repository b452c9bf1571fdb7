// Checks the PDF signature of an issued document (see pades.ts): exactly one, its byte range
// covering the whole file but its own value (nothing appended, no incremental update after it),
// the PAdES sub-filter, and the CMS itself (app/signing/cades.ts). Says what it found in words.
import { createHash, type X509Certificate } from 'node:crypto';
import { findByteRange } from '@signpdf/utils';
import * as asn1js from 'asn1js';
import { cadesVerify } from '../signing/cades';
import { SUB_FILTER } from './pades';

export interface PdfSignatureCheck {
  present: boolean;
  /** [start1, length1, start2, length2] of the one signature, when it has one. */
  byteRange: [number, number, number, number] | null;
  certificate: X509Certificate | null;
  /** SHA-256 of the signing certificate (DER), hex. */
  fingerprint: string | null;
  problems: string[];
}

export function checkPdfSignature(pdf: Buffer): PdfSignatureCheck {
  const none: PdfSignatureCheck = {
    present: false,
    byteRange: null,
    certificate: null,
    fingerprint: null,
    problems: [],
  };
  let ranges: string[][];
  try {
    // Every /ByteRange in the file (the library's typings call the list byteRange).
    ranges = (findByteRange(pdf) as unknown as { byteRanges: string[][] }).byteRanges;
  } catch {
    return { ...none, present: true, problems: ['the signature byte range cannot be read'] };
  }
  if (ranges.length === 0) return none;
  if (ranges.length > 1)
    return {
      ...none,
      present: true,
      problems: [
        `the file carries ${ranges.length} signatures: something was signed into it after it was issued (an incremental update)`,
      ],
    };
  const nums = (ranges[0] ?? []).map(Number);
  if (nums.length !== 4 || nums.some((n) => !Number.isSafeInteger(n) || n < 0))
    return { ...none, present: true, problems: ['the signature byte range is not four whole numbers'] };
  const [a, b, c, d] = nums as [number, number, number, number];
  const problems: string[] = [];
  const byteRange: PdfSignatureCheck['byteRange'] = [a, b, c, d];
  if (a !== 0 || b >= c || c + d > pdf.length)
    return {
      ...none,
      present: true,
      byteRange,
      problems: ['the signature byte range does not describe this file'],
    };
  if (c + d !== pdf.length)
    problems.push(
      `the signature does not cover the whole file: ${pdf.length - (c + d)} bytes were added after it was signed (an incremental update or appended data)`,
    );
  const hex = pdf.subarray(b, c).toString('latin1');
  if (!/^<[0-9a-fA-F]*>$/.test(hex))
    return {
      ...none,
      present: true,
      byteRange,
      problems: [...problems, 'the bytes the signature leaves out are not just its own value'],
    };
  // The signature dictionary around the value: from its object's start to its end.
  const before = pdf.subarray(0, b).toString('latin1');
  const objStart = Math.max(0, before.lastIndexOf(' obj'));
  const objEnd = pdf.indexOf('endobj', c);
  const dict = before.slice(objStart) + pdf.subarray(c, objEnd < 0 ? c : objEnd).toString('latin1');
  const sub = /\/SubFilter\s*\/([A-Za-z0-9.]+)/.exec(dict)?.[1];
  if (sub !== SUB_FILTER)
    problems.push(`the signature's sub-filter is ${sub ?? 'missing'}, not ${SUB_FILTER} (PAdES baseline)`);
  const value = Buffer.from(hex.slice(1, -1), 'hex');
  // The value is zero-padded to the room kept for it: the CMS is the first DER element.
  const first = asn1js.fromBER(value);
  const cms = first.offset > 0 ? value.subarray(0, first.offset) : value;
  const signed = Buffer.concat([pdf.subarray(a, a + b), pdf.subarray(c, c + d)]);
  const v = cadesVerify(cms, signed);
  problems.push(...v.problems);
  const fingerprint = v.certificate ? createHash('sha256').update(v.certificate.raw).digest('hex') : null;
  return { present: true, byteRange, certificate: v.certificate, fingerprint, problems };
}
