// The optional standard PDF signature (PAdES-style, PKCS#7 detached) that common PDF readers
// show, made with a PKCS#12 certificate the lab provides. It seals the whole file; the
// signatures of people on the record are separate (Ed25519 over the record, see verify.ts).
import { pdfkitAddPlaceholder } from '@signpdf/placeholder-pdfkit';
import { P12Signer } from '@signpdf/signer-p12';
// A named import: the package is CommonJS, and under Node a default import gives its whole
// exports object (whose `default` is the instance), not the instance.
import { SignPdf } from '@signpdf/signpdf';

export interface PadesOptions {
  /** The lab's PKCS#12 (.p12/.pfx) bytes and its passphrase. */
  p12: Buffer;
  passphrase: string;
  reason: string;
  name: string;
  location: string;
  contactInfo: string;
  signingTime: Date;
}

/** Adds the signature field and its placeholder; call before the document ends. */
export function addSignaturePlaceholder(doc: PDFKit.PDFDocument, o: PadesOptions): void {
  // The refs returned are already ended by the placeholder; ending them again hangs doc.end().
  pdfkitAddPlaceholder({
    pdf: doc,
    pdfBuffer: Buffer.alloc(0),
    reason: o.reason,
    contactInfo: o.contactInfo,
    name: o.name,
    location: o.location,
    signingTime: o.signingTime,
    signatureLength: 16384,
    // adbe.pkcs7.detached: P12Signer makes a plain CMS signature without the ESS
    // signing-certificate attribute that the ETSI.CAdES.detached sub-filter would promise.
    subFilter: 'adbe.pkcs7.detached',
    appName: 'Dipledger',
  });
}

/** Fills the placeholder with a CMS signature over the byte ranges. */
export async function signWithP12(pdf: Buffer, o: PadesOptions): Promise<Buffer> {
  const signer = new P12Signer(o.p12, { passphrase: o.passphrase });
  return new SignPdf().sign(pdf, signer, o.signingTime);
}
