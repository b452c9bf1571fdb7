// The PDF signature every issued document carries (PAdES baseline B-B, ETSI EN 319 142-1:
// sub-filter ETSI.CAdES.detached, a CMS with the signing certificate and the ESS
// signing-certificate-v2 attribute; see app/signing/cades.ts), made with the lab's
// document-signing key or the lab's own PKCS#12. It seals the whole file; the signatures of
// people on the record are separate (Ed25519 over the record, see verify.ts).
//
// The signature field is drawn from the document's data alone (its words and time), so
// `verify` can draw the same file again from the embedded record and compare it byte for byte
// outside the signature value.
import { pdfkitAddPlaceholder } from '@signpdf/placeholder-pdfkit';
// Named imports: the package is CommonJS, and under Node a default import gives its whole
// exports object (whose `default` is the instance), not the instance.
import { SignPdf, Signer } from '@signpdf/signpdf';
import { cadesSign } from '../signing/cades';
import type { DocumentSigner } from '../signing/document-key';
import type { CheckDocumentData } from './model';

/** Bytes kept for the CMS (written as twice as many hex digits): room for a chain of a few
 * RSA-4096 certificates from a lab's PKCS#12. */
export const SIGNATURE_BYTES = 16384;
export const SUB_FILTER = 'ETSI.CAdES.detached';

/** Adds the signature field and its placeholder; call before the document ends. */
export function addSignaturePlaceholder(doc: PDFKit.PDFDocument, data: CheckDocumentData): void {
  const word = data.issue.kind === 'certificate' ? 'Certificate' : 'Check-sheet';
  // The refs returned are already ended by the placeholder; ending them again hangs doc.end().
  pdfkitAddPlaceholder({
    pdf: doc,
    pdfBuffer: Buffer.alloc(0),
    reason: `${word} ${data.issue.number} revision ${data.issue.revision} issued`,
    contactInfo: data.lab.address,
    name: data.lab.name,
    location: data.lab.address || data.lab.name,
    signingTime: new Date(data.issue.issuedAt),
    signatureLength: SIGNATURE_BYTES,
    subFilter: SUB_FILTER,
    appName: 'Dipledger',
  });
}

class CadesSigner extends Signer {
  constructor(private readonly signer: DocumentSigner) {
    super();
  }
  override sign(pdf: Buffer): Promise<Buffer> {
    return Promise.resolve(cadesSign(pdf, this.signer.key, this.signer.chain));
  }
}

/** Fills the placeholder with the CMS signature over the byte ranges. */
export async function signPdf(pdf: Buffer, signer: DocumentSigner): Promise<Buffer> {
  return new SignPdf().sign(pdf, new CadesSigner(signer));
}
