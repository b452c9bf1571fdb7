// Document commands: `certificate CHECK --out FILE.pdf` and `sheet CHECK --out FILE.pdf` issue
// the documents of a signed check, `worksheet REF --out FILE.pdf` prints the bench worksheet,
// `documents [REF]` lists what was issued, and `verify FILE.pdf` checks a document against
// itself and, where the lab file is at hand, against what the lab recorded. Thin: one LabApi
// call each. Exit 1 from verify on any mismatch.
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { LabError } from '../api/errors';
import type {
  IssueDocumentInput,
  IssuedDocument,
  IssuedDocumentFile,
  VerifyReport,
} from '../api/contract-documents';
import { verifyDocumentBytes } from '../documents/verify';
import type { CommandContext, CommandGroup } from './command';
import { dccTarget, writeIssuedDcc } from './commands-dcc';
import { UsageError, table } from './format';

function checkIdOf(ctx: CommandContext): number {
  const raw = ctx.arg('CHECK');
  const n = Number(raw);
  if (!Number.isInteger(n) || n <= 0)
    throw LabError.field(
      'CHECK',
      raw,
      'a check number, such as 12',
      `CHECK: ${JSON.stringify(raw)} is not a check number`,
    );
  return n;
}

function outOf(ctx: CommandContext): string {
  const out = ctx.values.out;
  if (typeof out !== 'string' || !out.trim()) throw new UsageError('--out FILE.pdf is required');
  return path.resolve(ctx.io.cwd, out);
}

function readFileOr400(file: string, field: string, what: string): Buffer {
  try {
    return readFileSync(file);
  } catch {
    throw LabError.field(field, file, `a readable ${what}`, `cannot read ${file}`);
  }
}

/** The lab's PKCS#12 for an embedded PDF signature: --p12 FILE, passphrase from
 * --p12-passphrase-file or DIPLEDGER_P12_PASSPHRASE. */
function pdfSignatureOf(ctx: CommandContext): IssueDocumentInput['pdfSignature'] {
  const p12 = ctx.values.p12;
  if (typeof p12 !== 'string') return undefined;
  const bytes = readFileOr400(path.resolve(ctx.io.cwd, p12), '--p12', 'PKCS#12 file');
  const passFile = ctx.values['p12-passphrase-file'];
  const passphrase =
    typeof passFile === 'string'
      ? readFileOr400(path.resolve(ctx.io.cwd, passFile), '--p12-passphrase-file', 'file')
          .toString('utf8')
          .replace(/\r?\n$/, '')
      : (ctx.io.env.DIPLEDGER_P12_PASSPHRASE ?? '');
  return { p12Base64: bytes.toString('base64'), passphrase };
}

export function issuedText(d: IssuedDocument, file?: string): string {
  const lines = [
    `${d.kind} ${d.number} revision ${d.revision}: check ${d.checkId} revision ${d.checkRevision} of ${d.meterAssetId}`,
    `issued ${d.issuedAt} by ${d.issuedBy}; ${d.signatures} signature(s)${d.pdfSigned ? '; PDF signature embedded' : ''}${d.intervalPrinted ? '; suggested interval printed' : ''}`,
    `SHA-256 ${d.sha256}`,
    `record ${d.recordName} (SHA-256 ${d.recordSha256})`,
  ];
  if (d.replaces)
    lines.push(`replaces ${d.replaces.number} revision ${d.replaces.revision}: ${d.replaces.reason}`);
  if (file) lines.push(`wrote ${file} (${d.byteLength} bytes)`);
  return lines.join('\n');
}

const MARK = { ok: 'ok  ', fail: 'FAIL', 'not-checked': '--  ' } as const;

export function verifyText(r: VerifyReport, file: string): string {
  const head = r.document
    ? `${file}: ${r.document.kind} ${r.document.number} revision ${r.document.revision}${r.check ? `, check ${r.check.checkId} revision ${r.check.revision} of ${r.check.meter} (${r.check.date})` : ''}`
    : `${file}`;
  const lines = [head, ...r.findings.map((f) => `  ${MARK[f.status]}  ${f.check}: ${f.detail}`)];
  const failures = r.findings.filter((f) => f.status === 'fail').length;
  lines.push(
    r.ok
      ? 'VERIFIED: everything checked holds (lines marked -- could not be checked here).'
      : `NOT VERIFIED: ${failures} check(s) failed; do not rely on this document.`,
  );
  return lines.join('\n');
}

async function issue(ctx: CommandContext, kind: 'certificate' | 'sheet'): Promise<number> {
  const checkId = checkIdOf(ctx);
  const out = outOf(ctx);
  const dccFile = dccTarget(ctx, kind);
  const reason = ctx.values.reason;
  const input: IssueDocumentInput = {
    checkId,
    ...(typeof reason === 'string' ? { replaceReason: reason } : {}),
    ...(ctx.values.p12 !== undefined ? { pdfSignature: pdfSignatureOf(ctx) } : {}),
  };
  const api = ctx.open().api;
  const d: IssuedDocumentFile =
    kind === 'certificate' ? await api.issueCertificate(input) : await api.issueSheet(input);
  writeFileSync(out, Buffer.from(d.pdfBase64, 'base64'));
  const dcc = dccFile === undefined ? undefined : await writeIssuedDcc(ctx, d, dccFile);
  const { pdfBase64, ...shown } = d;
  void pdfBase64; // the bytes went to the file, not to the screen
  ctx.print({ ...shown, file: out, ...(dcc ? { dccFile, dccSha256: dcc.sha256 } : {}) }, () =>
    dcc ? `${issuedText(d, out)}\nwrote ${dccFile} (DCC, SHA-256 ${dcc.sha256})` : issuedText(d, out),
  );
  return 0;
}

export const documentCommands: CommandGroup = {
  usage: `  certificate CHECK --out FILE.pdf [--reason TEXT] [--p12 FILE] [--dcc FILE.xml]
                                     issue the certificate of a signed check (PDF/A-3b with its
                                     record and DCC attached); --reason replaces the current one;
                                     --dcc also writes the DCC (XML) to a file
  sheet CHECK --out FILE.pdf [--reason TEXT]   issue the check-sheet of a signed check
  worksheet REF --out FILE.pdf       the bench worksheet of a meter, to print before a check
  documents [REF]                    issued certificates and check-sheets
  verify FILE.pdf [--standalone]     check a document: its record, its signatures and, with the
                                     lab file, that it is the file issued (exit 1 on a mismatch)
`,
  options: {
    p12: { type: 'string' },
    'p12-passphrase-file': { type: 'string' },
    reason: { type: 'string' },
    standalone: { type: 'boolean', default: false },
  },
  commands: {
    certificate: (ctx) => issue(ctx, 'certificate'),
    sheet: (ctx) => issue(ctx, 'sheet'),

    async worksheet(ctx) {
      const ref = ctx.arg('REF');
      const out = outOf(ctx);
      const w = await ctx.open().api.worksheet(ref);
      const bytes = Buffer.from(w.pdfBase64, 'base64');
      writeFileSync(out, bytes);
      ctx.print(
        { assetId: w.assetId, printedOn: w.printedOn, file: out, bytes: bytes.length },
        () => `wrote ${out}: worksheet for ${w.assetId}`,
      );
      return 0;
    },

    async documents(ctx) {
      const ref = ctx.rest[0];
      const rows = await ctx.open().api.listDocuments(ref ? { meter: ref } : {});
      ctx.print(rows, () =>
        rows.length
          ? table(
              ['number', 'rev', 'kind', 'meter', 'check', 'issued', 'status', 'sha256'],
              rows.map((d) => [
                d.number,
                String(d.revision),
                d.kind,
                d.meterAssetId,
                `${d.checkId} r${d.checkRevision}`,
                d.issuedAt.slice(0, 10),
                d.replacedBy ? `replaced by r${d.replacedBy.revision}` : 'current',
                d.sha256.slice(0, 16),
              ]),
              [1],
            )
          : 'no documents issued',
      );
      return 0;
    },

    async verify(ctx) {
      const file = ctx.arg('FILE.pdf');
      const bytes = readFileOr400(path.resolve(ctx.io.cwd, file), 'FILE.pdf', 'PDF file');
      // "Where available": the lab file is used when it exists, unless --standalone.
      const useLab = !ctx.values.standalone && existsSync(ctx.dbFile);
      const report = useLab
        ? await ctx.open().api.verifyDocument({ pdfBase64: bytes.toString('base64') })
        : verifyDocumentBytes(bytes);
      ctx.print(
        report,
        () =>
          verifyText(report, file) + (useLab ? '' : '\n(no lab file: checked against the document alone)'),
      );
      return report.ok ? 0 : 1;
    },
  },
};
