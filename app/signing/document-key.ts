// The lab's document-signing key: an ECDSA P-256 key and a self-issued X.509 certificate made
// once per lab (at init, or at the first issue of a lab file older than this), with which every
// issued certificate and check-sheet is signed as a PDF signature any PDF reader checks. A lab
// that has a certificate from a certification authority signs with its own PKCS#12 instead.
//
// The private key is kept in the lab file as unencrypted PKCS#8, on purpose: the document
// signature proves that the bytes are those the holder of the lab file issued, not who approved
// them (the people's Ed25519 signatures, each under its own passphrase, do that). Anyone who can
// open the lab file can already issue documents through the program, so a passphrase on this key
// would keep out nobody the program lets in; its protection is the file's own (permissions,
// backups), and it never leaves the file through the program.
import { createHash, createPrivateKey, webcrypto, X509Certificate, type KeyObject } from 'node:crypto';
// @peculiar/x509 resolves its algorithm providers through tsyringe, which needs the Reflect
// metadata polyfill loaded first.
import 'reflect-metadata';
import * as x509 from '@peculiar/x509';
import forge from 'node-forge';

export interface DocumentKeyMaterial {
  /** PEM of the self-issued certificate. */
  certificatePem: string;
  /** PKCS#8 PEM of the private key. */
  privateKeyPem: string;
  /** SHA-256 of the certificate's DER, hex: what a recipient compares. */
  fingerprint: string;
}

/** Signing material ready to use: the private key and the chain, signing certificate first. */
export interface DocumentSigner {
  key: KeyObject;
  chain: Buffer[];
  fingerprint: string;
  certificatePem: string;
  origin: 'lab' | 'pkcs12';
}

const YEARS_VALID = 30;

export function certificateFingerprint(pemOrDer: string | Buffer): string {
  return createHash('sha256').update(new X509Certificate(pemOrDer).raw).digest('hex');
}

/** Subject words for the lab's certificate: its name, said to be the document-signing key. */
function subjectOf(labName: string): string {
  // RFC 4514 string: escape the characters that have a meaning in it.
  const esc = (s: string) => s.replace(/([,+"\\<>;=#])/g, '\\$1').trim() || 'Laboratory';
  return `CN=${esc(labName)} document signing, O=${esc(labName)}`;
}

/** Makes a new key and its self-issued certificate, valid from `nowIso` for thirty years. */
export async function makeDocumentKey(labName: string, nowIso: string): Promise<DocumentKeyMaterial> {
  const alg = { name: 'ECDSA', namedCurve: 'P-256', hash: 'SHA-256' };
  // Node's WebCrypto; its declared type differs from the DOM's in ways that do not matter here.
  const crypto = webcrypto as unknown as Crypto;
  const keys = await crypto.subtle.generateKey(alg, true, ['sign', 'verify']);
  const notBefore = new Date(nowIso);
  const notAfter = new Date(notBefore);
  notAfter.setUTCFullYear(notAfter.getUTCFullYear() + YEARS_VALID);
  const serial = createHash('sha256')
    .update(`${labName}\n${nowIso}\n${Math.random()}`)
    .digest('hex')
    .slice(0, 30);
  const cert = await x509.X509CertificateGenerator.createSelfSigned(
    {
      serialNumber: `01${serial}`,
      name: subjectOf(labName),
      notBefore,
      notAfter,
      signingAlgorithm: alg,
      keys,
      extensions: [
        new x509.BasicConstraintsExtension(false, undefined, true),
        new x509.KeyUsagesExtension(
          x509.KeyUsageFlags.digitalSignature | x509.KeyUsageFlags.nonRepudiation,
          true,
        ),
        // id-kp-documentSigning (RFC 9336).
        new x509.ExtendedKeyUsageExtension(['1.3.6.1.5.5.7.3.36']),
        await x509.SubjectKeyIdentifierExtension.create(keys.publicKey, false, crypto),
      ],
    },
    crypto,
  );
  const pkcs8 = Buffer.from(await crypto.subtle.exportKey('pkcs8', keys.privateKey));
  const privateKeyPem = createPrivateKey({ key: pkcs8, format: 'der', type: 'pkcs8' })
    .export({ type: 'pkcs8', format: 'pem' })
    .toString();
  const certificatePem = cert.toString('pem');
  return { certificatePem, privateKeyPem, fingerprint: certificateFingerprint(certificatePem) };
}

export function labSigner(m: { certificatePem: string; privateKeyPem: string }): DocumentSigner {
  const cert = new X509Certificate(m.certificatePem);
  return {
    key: createPrivateKey(m.privateKeyPem),
    chain: [cert.raw],
    fingerprint: certificateFingerprint(cert.raw),
    certificatePem: m.certificatePem,
    origin: 'lab',
  };
}

export class Pkcs12Error extends Error {}

/** The key and certificate chain of a PKCS#12 file (read with node-forge). */
export function pkcs12Signer(p12: Buffer, passphrase: string): DocumentSigner {
  let parsed: ReturnType<typeof forge.pkcs12.pkcs12FromAsn1>;
  try {
    const asn1 = forge.asn1.fromDer(forge.util.createBuffer(p12.toString('binary')));
    parsed = forge.pkcs12.pkcs12FromAsn1(asn1, false, passphrase);
  } catch (e) {
    const m = e instanceof Error ? e.message : String(e);
    throw new Pkcs12Error(
      /mac|password|decrypt/i.test(m)
        ? 'the passphrase does not open it'
        : 'it is not a PKCS#12 file (.p12 or .pfx)',
    );
  }
  const bags = (type: string): forge.pkcs12.Bag[] => parsed.getBags({ bagType: type })[type] ?? [];
  const oids = forge.pki.oids as Record<string, string>;
  const keyBags = [...bags(oids.pkcs8ShroudedKeyBag ?? ''), ...bags(oids.keyBag ?? '')];
  const certBags = bags(oids.certBag ?? '');
  const keyBag = keyBags.find((b) => b.key);
  if (!keyBag?.key) throw new Pkcs12Error('it holds no private key');
  const key = createPrivateKey(forge.pki.privateKeyToPem(keyBag.key));
  const certs = certBags.flatMap((b) =>
    b.cert
      ? [
          new X509Certificate(
            Buffer.from(forge.asn1.toDer(forge.pki.certificateToAsn1(b.cert)).getBytes(), 'binary'),
          ),
        ]
      : [],
  );
  const leafIndex = certs.findIndex((c) => c.checkPrivateKey(key));
  const leaf = certs[leafIndex];
  if (!leaf) throw new Pkcs12Error('it holds no certificate for its private key');
  const chain = [leaf, ...certs.filter((_, i) => i !== leafIndex)].map((c) => c.raw);
  return {
    key,
    chain,
    fingerprint: certificateFingerprint(leaf.raw),
    certificatePem: leaf.toString(),
    origin: 'pkcs12',
  };
}
