// The DCC of an issued certificate, taken from the certificate's stored bytes (the XML attached
// beside its record when it was issued), so what the lab hands out is exactly what the signed
// PDF carries. A certificate issued before certificates carried a DCC is refused with the way
// to get one: a replacement certificate.
import { z } from 'zod';
import {
  currentDocumentOfCheck,
  findIssuedDocument,
  issuedPdf,
  type IssuedDocumentRecord,
} from '../../../db/queries/documents';
import { attachedDcc } from '../../documents/dcc-verify';
import { readPdf } from '../../documents/pdfread';
import { sha256Hex } from '../../documents/record';
import type { OpGroup, ServiceContext } from './context';
import type { DccApi, DccQuery } from '../contract-dcc';
import { LabError } from '../errors';
import { parseWith } from '../issues';

const DccQuerySchema = z
  .object({
    checkId: z
      .number('expected a check number')
      .int('expected a whole check number')
      .positive('expected a check number')
      .optional(),
    number: z.string().trim().min(1, 'expected a certificate number such as C-2026-0001').optional(),
    revision: z
      .number('expected a revision number')
      .int('expected a whole revision number')
      .positive('expected a revision number')
      .optional(),
  })
  .strict();

export function getDcc(ctx: ServiceContext, query: DccQuery) {
  const q = parseWith(DccQuerySchema, query);
  let doc: IssuedDocumentRecord | undefined;
  if (q.checkId !== undefined && q.number === undefined && q.revision === undefined) {
    doc = currentDocumentOfCheck(ctx.db, 'certificate', q.checkId);
    if (!doc)
      throw LabError.field(
        'checkId',
        q.checkId,
        'a check with an issued certificate',
        `checkId: check ${q.checkId} has no certificate; issue one first ("dipledger certificate ${q.checkId} --out FILE.pdf --dcc FILE.xml")`,
      );
  } else if (q.checkId === undefined && q.number !== undefined && q.revision !== undefined) {
    doc = findIssuedDocument(ctx.db, q.number, q.revision);
    if (!doc || doc.kind !== 'certificate')
      throw LabError.field(
        'number',
        q.number,
        'the number of a certificate this lab issued',
        `number: this lab issued no certificate ${q.number} revision ${q.revision}`,
      );
  } else {
    throw LabError.field(
      'checkId',
      query,
      'either checkId, or number and revision together',
      'checkId: give either the check number, or the certificate number and revision together',
    );
  }
  const pdf = issuedPdf(ctx.db, doc.id);
  const file = pdf ? attachedDcc(readPdf(pdf)) : undefined;
  if (!file)
    throw new LabError(
      'refused',
      `certificate ${doc.number} revision ${doc.revision} was issued before certificates carried a DCC; to get one, issue a replacement ("dipledger certificate ${doc.checkId} --reason TEXT --out FILE.pdf --dcc FILE.xml")`,
      [
        {
          field: q.checkId !== undefined ? 'checkId' : 'number',
          value: q.checkId ?? q.number,
          expected: 'a certificate that carries a DCC',
          message: `certificate ${doc.number} revision ${doc.revision} carries no DCC`,
        },
      ],
    );
  return {
    number: doc.number,
    revision: doc.revision,
    checkId: doc.checkId,
    checkRevision: doc.checkRevision,
    fileName: file.name,
    sha256: sha256Hex(file.bytes),
    xml: file.bytes.toString('utf8'),
  };
}

export const dccOps = { getDcc } satisfies OpGroup<keyof DccApi>;
