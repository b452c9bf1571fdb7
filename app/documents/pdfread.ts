// Reads back what verification needs from a PDF Dipledger wrote: the information dictionary,
// the embedded files (PDF/A-3 associated files) and the byte range of an embedded signature.
// Hand-written because no PDF parser is among the project's libraries and the need is narrow:
// classic cross-reference files as pdfkit writes them, objects "N 0 obj ... endobj", streams
// with /Length and optional /FlateDecode. Anything else is reported as unreadable, never guessed.
import { inflateSync } from 'node:zlib';

export class PdfReadError extends Error {}

export interface PdfObject {
  dict: string;
  stream: Buffer | null;
}

export interface PdfContents {
  info: Record<string, string>;
  /** Attached files; `damaged` when the compressed data does not decode (bytes then empty). */
  files: { name: string; relationship: string | null; bytes: Buffer; damaged: boolean }[];
  /** /ByteRange of an embedded signature, if any: [start1, length1, start2, length2]. */
  signatureByteRange: number[] | null;
}

/** Decodes a PDF literal or hex string (PDF 32000-1:2008 7.3.4), UTF-16BE when it has a BOM. */
export function decodePdfString(raw: string): string {
  let bytes: number[] = [];
  if (raw.startsWith('<')) {
    const hex = raw.slice(1, -1).replace(/\s+/g, '');
    for (let i = 0; i < hex.length; i += 2) bytes.push(parseInt(hex.slice(i, i + 2).padEnd(2, '0'), 16));
  } else {
    const body = raw.slice(1, -1);
    for (let i = 0; i < body.length; i++) {
      const ch = body[i] as string;
      if (ch !== '\\') {
        bytes.push(ch.charCodeAt(0) & 0xff);
        continue;
      }
      const next = body[++i] ?? '';
      const simple: Record<string, number> = { n: 10, r: 13, t: 9, b: 8, f: 12, '(': 40, ')': 41, '\\': 92 };
      if (next in simple) bytes.push(simple[next] as number);
      else if (/[0-7]/.test(next)) {
        let oct = next;
        while (oct.length < 3 && /[0-7]/.test(body[i + 1] ?? '')) oct += body[++i];
        bytes.push(parseInt(oct, 8) & 0xff);
      } else if (next === '\r' || next === '\n') {
        if (next === '\r' && body[i + 1] === '\n') i++;
      } else bytes.push(next.charCodeAt(0) & 0xff);
    }
  }
  if (bytes[0] === 0xfe && bytes[1] === 0xff) {
    bytes = bytes.slice(2);
    const swapped = Buffer.alloc(bytes.length);
    for (let i = 0; i + 1 < bytes.length; i += 2) {
      swapped[i] = bytes[i + 1] as number;
      swapped[i + 1] = bytes[i] as number;
    }
    return swapped.toString('utf16le');
  }
  return Buffer.from(bytes).toString('latin1');
}

/** The first PDF string token in `text` (balanced parentheses or <hex>). */
function firstString(text: string): string | null {
  const t = text.trimStart();
  if (t.startsWith('<') && !t.startsWith('<<')) {
    const end = t.indexOf('>');
    return end < 0 ? null : t.slice(0, end + 1);
  }
  if (!t.startsWith('(')) return null;
  let depth = 0;
  for (let i = 0; i < t.length; i++) {
    const c = t[i];
    if (c === '\\') i++;
    else if (c === '(') depth++;
    else if (c === ')' && --depth === 0) return t.slice(0, i + 1);
  }
  return null;
}

export function parseObjects(pdf: Buffer): Map<number, PdfObject> {
  const text = pdf.toString('latin1');
  const objects = new Map<number, PdfObject>();
  const re = /(?:^|[\r\n])(\d+) 0 obj\s/g;
  let m: RegExpExecArray | null;
  while ((m = re.exec(text))) {
    const id = Number(m[1]);
    const start = m.index + m[0].length;
    const streamAt = text.indexOf('stream', start);
    const endAt = text.indexOf('endobj', start);
    if (endAt < 0) throw new PdfReadError(`object ${id} has no end`);
    if (streamAt >= 0 && streamAt < endAt && !/end$/.test(text.slice(streamAt - 3, streamAt))) {
      const dict = text.slice(start, streamAt);
      const length = /\/Length (\d+)/.exec(dict);
      if (!length) throw new PdfReadError(`stream of object ${id} has no length`);
      let dataStart = streamAt + 'stream'.length;
      if (text[dataStart] === '\r') dataStart++;
      if (text[dataStart] === '\n') dataStart++;
      const dataEnd = dataStart + Number(length[1]);
      if (dataEnd > pdf.length)
        throw new PdfReadError(`stream of object ${id} runs past the end of the file`);
      objects.set(id, { dict, stream: pdf.subarray(dataStart, dataEnd) });
      re.lastIndex = dataEnd;
    } else {
      objects.set(id, { dict: text.slice(start, endAt), stream: null });
      re.lastIndex = endAt;
    }
  }
  return objects;
}

function resolveString(objects: Map<number, PdfObject>, value: string): string | null {
  const ref = /^\s*(\d+) 0 R/.exec(value);
  const raw = ref ? (objects.get(Number(ref[1]))?.dict ?? '') : value;
  const s = firstString(raw);
  return s === null ? null : decodePdfString(s);
}

export function readPdf(pdf: Buffer): PdfContents {
  if (pdf.subarray(0, 5).toString('latin1') !== '%PDF-') throw new PdfReadError('the file is not a PDF');
  const text = pdf.toString('latin1');
  const trailerAt = text.lastIndexOf('trailer');
  if (trailerAt < 0) throw new PdfReadError('the file has no trailer');
  const objects = parseObjects(pdf);

  const info: Record<string, string> = {};
  const infoRef = /\/Info (\d+) 0 R/.exec(text.slice(trailerAt));
  const infoDict = infoRef ? objects.get(Number(infoRef[1]))?.dict : undefined;
  if (infoDict) {
    for (const e of infoDict.matchAll(/\/([A-Za-z0-9]+) (\d+ 0 R|\(|<)/g)) {
      const key = e[1] as string;
      const v = resolveString(objects, infoDict.slice((e.index ?? 0) + key.length + 2));
      if (v !== null) info[key] = v;
    }
  }

  const files: PdfContents['files'] = [];
  for (const obj of objects.values()) {
    if (!/\/Type \/Filespec/.test(obj.dict)) continue;
    const nameAt = /\/UF |\/F \(/.exec(obj.dict);
    const name = nameAt ? resolveString(objects, obj.dict.slice(nameAt.index + 3)) : null;
    const ef = /\/EF\s*<<\s*\/F (\d+) 0 R/.exec(obj.dict);
    const rel = /\/AFRelationship \/([A-Za-z]+)/.exec(obj.dict);
    const stream = ef ? objects.get(Number(ef[1])) : undefined;
    if (!name || !stream?.stream) continue;
    let bytes = stream.stream;
    let damaged = false;
    if (/\/Filter \/FlateDecode/.test(stream.dict)) {
      try {
        bytes = inflateSync(bytes);
      } catch {
        bytes = Buffer.alloc(0);
        damaged = true;
      }
    }
    files.push({ name, relationship: rel?.[1] ?? null, bytes, damaged });
  }

  const br = /\/ByteRange\s*\[\s*(\d+)\s+(\d+)\s+(\d+)\s+(\d+)\s*\]/.exec(text);
  return { info, files, signatureByteRange: br ? br.slice(1, 5).map(Number) : null };
}
