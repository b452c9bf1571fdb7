// The lab's document-signing key as the documents operations use it: made (and audited) when a
// lab has none, at init or at the first issue of a lab file made before documents were signed
// as PDFs; the lab's own PKCS#12 read with the field named when it cannot be used; and the
// certificate of each PKCS#12 that signed a document kept, so `verify` knows it as the lab's.
import { appendAudit } from '../../../db/queries/audit';
import {
  currentLabDocumentKey,
  documentKeyByFingerprint,
  insertDocumentKey,
  type DocumentKeyRecord,
} from '../../../db/queries/document-keys';
import {
  labSigner,
  makeDocumentKey,
  pkcs12Signer,
  Pkcs12Error,
  type DocumentSigner,
} from '../../signing/document-key';
import type { ServiceContext } from './context';
import { LabError } from '../errors';
import { requireLab } from './lookups';

/** The lab's current document key, made and stored (with an audit entry) when it has none. */
export async function ensureLabDocumentKey(ctx: ServiceContext): Promise<DocumentKeyRecord> {
  const existing = currentLabDocumentKey(ctx.db);
  if (existing) return existing;
  const at = ctx.clock.now();
  const made = await makeDocumentKey(requireLab(ctx).name, at);
  return ctx.db.transaction(() => {
    // Another issue may have made one meanwhile: the first one stored is the lab's.
    const meanwhile = currentLabDocumentKey(ctx.db);
    if (meanwhile) return meanwhile;
    insertDocumentKey(ctx.db, {
      origin: 'lab',
      createdAt: at,
      fingerprint: made.fingerprint,
      certificatePem: made.certificatePem,
      privateKeyPem: made.privateKeyPem,
    });
    appendAudit(ctx.db, {
      at,
      actor: ctx.actor,
      action: 'create',
      entity: 'document-key',
      entityId: made.fingerprint,
      before: undefined,
      after: { origin: 'lab', fingerprint: made.fingerprint, certificatePem: made.certificatePem },
    });
    const stored = currentLabDocumentKey(ctx.db);
    if (!stored) throw new LabError('internal', 'the document-signing key was not stored');
    return stored;
  })();
}

export async function labDocumentSigner(ctx: ServiceContext): Promise<DocumentSigner> {
  const k = await ensureLabDocumentKey(ctx);
  if (!k.privateKeyPem) throw new LabError('internal', 'the lab document key has no private key');
  return labSigner({ certificatePem: k.certificatePem, privateKeyPem: k.privateKeyPem });
}

/** The signer of a PKCS#12 the caller gave; refused naming the field when it cannot sign. */
export function pkcs12DocumentSigner(p12Base64: string, passphrase: string): DocumentSigner {
  try {
    return pkcs12Signer(Buffer.from(p12Base64, 'base64'), passphrase);
  } catch (e) {
    if (!(e instanceof Pkcs12Error)) throw e;
    throw LabError.field(
      'pdfSignature',
      '(PKCS#12 file)',
      'a PKCS#12 file and its passphrase',
      `pdfSignature: the PKCS#12 file cannot sign: ${e.message}; nothing was issued`,
    );
  }
}

/** Inside the transaction: keeps the certificate of a PKCS#12 that signed, once. */
export function keepSigningCertificate(ctx: ServiceContext, signer: DocumentSigner, at: string): void {
  if (signer.origin !== 'pkcs12' || documentKeyByFingerprint(ctx.db, signer.fingerprint)) return;
  insertDocumentKey(ctx.db, {
    origin: 'pkcs12',
    createdAt: at,
    fingerprint: signer.fingerprint,
    certificatePem: signer.certificatePem,
    privateKeyPem: null,
  });
  appendAudit(ctx.db, {
    at,
    actor: ctx.actor,
    action: 'create',
    entity: 'document-key',
    entityId: signer.fingerprint,
    before: undefined,
    after: { origin: 'pkcs12', fingerprint: signer.fingerprint, certificatePem: signer.certificatePem },
  });
}
