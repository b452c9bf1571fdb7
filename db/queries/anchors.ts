// The issued documents as integrity reads them for their anchored audit heads: every row, whatever
// it refers to, oldest first.
import type { LabDb } from '../store';

export interface IssuedPdf {
  number: string;
  revision: number;
  recordName: string;
  pdf: Buffer;
}

export function* issuedPdfs(db: LabDb): Generator<IssuedPdf> {
  const rows = db
    .prepare('SELECT number, revision, record_name AS recordName, pdf FROM issued_document ORDER BY id')
    .iterate() as IterableIterator<IssuedPdf>;
  for (const r of rows) yield r;
}
