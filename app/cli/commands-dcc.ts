// The Digital Calibration Certificate on the command line: `dcc CHECK --out FILE.xml` writes the
// DCC a check's issued certificate carries, and `certificate CHECK --out FILE.pdf --dcc FILE.xml`
// writes it beside the certificate it issues. Thin: one LabApi call, the bytes to a file.
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import type { DccFile } from '../api/contract-dcc';
import type { IssuedDocument } from '../api/contract-documents';
import { LabError } from '../api/errors';
import type { CommandContext, CommandGroup } from './command';
import { UsageError } from './format';

/** Where --dcc asks the DCC to go, checked before anything is issued. */
export function dccTarget(ctx: CommandContext, kind: 'certificate' | 'sheet'): string | undefined {
  const v = ctx.values.dcc;
  if (v === undefined) return undefined;
  if (kind !== 'certificate')
    throw new UsageError('--dcc applies to certificates only (check-sheets carry no DCC)');
  if (typeof v !== 'string' || !v.trim()) throw new UsageError('--dcc FILE.xml needs a file name');
  return path.resolve(ctx.io.cwd, v);
}

/** Writes the DCC of an issued certificate to `file`. */
export async function writeIssuedDcc(
  ctx: CommandContext,
  d: Pick<IssuedDocument, 'number' | 'revision'>,
  file: string,
): Promise<DccFile> {
  const dcc = await ctx.open().api.getDcc({ number: d.number, revision: d.revision });
  writeFileSync(file, dcc.xml, 'utf8');
  return dcc;
}

function dccText(dcc: DccFile, file: string): string {
  return [
    `DCC of certificate ${dcc.number} revision ${dcc.revision} (check ${dcc.checkId} revision ${dcc.checkRevision})`,
    `wrote ${file} (${Buffer.byteLength(dcc.xml)} bytes, SHA-256 ${dcc.sha256})`,
  ].join('\n');
}

export const dccCommands: CommandGroup = {
  usage: `  dcc CHECK --out FILE.xml          the Digital Calibration Certificate (DCC 3.1.2 XML) of the
                                     check's issued certificate, as the certificate carries it
`,
  options: {
    dcc: { type: 'string' },
  },
  commands: {
    async dcc(ctx) {
      const raw = ctx.arg('CHECK');
      const checkId = Number(raw);
      if (!Number.isInteger(checkId) || checkId <= 0)
        throw LabError.field(
          'CHECK',
          raw,
          'a check number, such as 12',
          `CHECK: ${JSON.stringify(raw)} is not a check number`,
        );
      const out = ctx.values.out;
      if (typeof out !== 'string' || !out.trim()) throw new UsageError('--out FILE.xml is required');
      const file = path.resolve(ctx.io.cwd, out);
      const dcc = await ctx.open().api.getDcc({ checkId });
      writeFileSync(file, dcc.xml, 'utf8');
      const { xml, ...shown } = dcc;
      void xml; // the XML went to the file, not to the screen
      ctx.print({ ...shown, file }, () => dccText(dcc, file));
      return 0;
    },
  },
};
