// Text files the CLI reads (exchange documents, histories, traces): strict UTF-8 without NUL
// bytes, or a refusal naming the file and the line, so a damaged byte never becomes part of a
// record (a name read with a replacement character would be a new person).
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { LabError } from '../api/errors';

const DECODER = new TextDecoder('utf-8', { fatal: true });

/** The line (1-based) of byte `at`. */
function lineOf(bytes: Buffer, at: number): number {
  let line = 1;
  for (let i = 0; i < at; i++) if (bytes[i] === 0x0a) line += 1;
  return line;
}

/** The first line (1-based) that is not UTF-8 on its own (a newline byte never occurs inside a
 * UTF-8 character, so lines decode separately). */
function firstInvalidLine(bytes: Buffer): number {
  let line = 1;
  let from = 0;
  while (from <= bytes.length) {
    const nl = bytes.indexOf(0x0a, from);
    const end = nl < 0 ? bytes.length : nl;
    try {
      DECODER.decode(bytes.subarray(from, end));
    } catch {
      return line;
    }
    if (nl < 0) break;
    from = nl + 1;
    line += 1;
  }
  return line;
}

export function decodeTextFile(bytes: Buffer, name: string, field = 'FILE'): string {
  const nul = bytes.indexOf(0);
  let text: string;
  try {
    text = DECODER.decode(bytes);
  } catch {
    throw LabError.field(
      field,
      name,
      'UTF-8 text',
      `${name} line ${firstInvalidLine(bytes)}: bytes that are not UTF-8 text (save the file as UTF-8); nothing was written`,
    );
  }
  if (nul >= 0)
    throw LabError.field(
      field,
      name,
      'text without NUL bytes',
      `${name} line ${lineOf(bytes, nul)}: a NUL byte, which text never holds; nothing was written`,
    );
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
}

export function readTextFile(file: string, cwd: string, field = 'FILE'): string {
  let bytes: Buffer;
  try {
    bytes = readFileSync(path.resolve(cwd, file));
  } catch {
    throw LabError.field(field, file, 'a readable file', `cannot read ${file}`);
  }
  return decodeTextFile(bytes, file, field);
}
