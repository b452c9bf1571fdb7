// The CMS signature an issued document carries as its PDF signature: CAdES baseline B-B
// (ETSI EN 319 122-1), detached, over the byte ranges of the PDF (PAdES baseline B-B, ETSI EN
// 319 142-1, sub-filter ETSI.CAdES.detached). Signed attributes: content-type, message-digest
// (SHA-256) and the ESS signing-certificate-v2 (RFC 5035) naming the signing certificate by its
// SHA-256 hash; no signing-time attribute (PAdES puts the time in the signature dictionary's
// /M entry). The structures are @peculiar/asn1-cms's; Node's crypto signs and verifies.
import { createHash, createPublicKey, sign, verify, X509Certificate, type KeyObject } from 'node:crypto';
import {
  Attribute,
  CertificateChoices,
  CertificateSet,
  ContentInfo,
  DigestAlgorithmIdentifiers,
  EncapsulatedContentInfo,
  IssuerAndSerialNumber,
  SignedData,
  SignerIdentifier,
  SignerInfo,
  SignerInfos,
  id_data,
  id_signedData,
} from '@peculiar/asn1-cms';
import {
  AsnConvert,
  AsnIntegerArrayBufferConverter,
  AsnProp,
  AsnPropTypes,
  AsnType,
  AsnTypeTypes,
  OctetString,
} from '@peculiar/asn1-schema';
import { AlgorithmIdentifier, Certificate, GeneralName, GeneralNames } from '@peculiar/asn1-x509';
import * as asn1js from 'asn1js';

export const OID = {
  sha256: '2.16.840.1.101.3.4.2.1',
  contentType: '1.2.840.113549.1.9.3',
  messageDigest: '1.2.840.113549.1.9.4',
  signingCertificateV2: '1.2.840.113549.1.9.16.2.47',
  ecdsaWithSha256: '1.2.840.10045.4.3.2',
  sha256WithRsa: '1.2.840.113549.1.1.11',
} as const;

// RFC 5035 section 3: IssuerSerial, ESSCertIDv2 and SigningCertificateV2. asn1-cms has no
// classes for them; they are declared here the way the asn1-* packages declare theirs.
class IssuerSerial {
  issuer = new GeneralNames();
  serialNumber = new ArrayBuffer(0);
  constructor(p: Partial<IssuerSerial> = {}) {
    Object.assign(this, p);
  }
}
AsnType({ type: AsnTypeTypes.Sequence })(IssuerSerial);
AsnProp({ type: GeneralNames })(IssuerSerial.prototype, 'issuer');
AsnProp({ type: AsnPropTypes.Integer, converter: AsnIntegerArrayBufferConverter })(
  IssuerSerial.prototype,
  'serialNumber',
);

class EssCertIdV2 {
  /** Absent means SHA-256, the default (DER leaves a default value out). */
  hashAlgorithm?: AlgorithmIdentifier;
  certHash = new OctetString();
  issuerSerial?: IssuerSerial;
  constructor(p: Partial<EssCertIdV2> = {}) {
    Object.assign(this, p);
  }
}
AsnType({ type: AsnTypeTypes.Sequence })(EssCertIdV2);
AsnProp({ type: AlgorithmIdentifier, optional: true })(EssCertIdV2.prototype, 'hashAlgorithm');
AsnProp({ type: OctetString })(EssCertIdV2.prototype, 'certHash');
AsnProp({ type: IssuerSerial, optional: true })(EssCertIdV2.prototype, 'issuerSerial');

class SigningCertificateV2 {
  certs: EssCertIdV2[] = [];
  constructor(p: Partial<SigningCertificateV2> = {}) {
    Object.assign(this, p);
  }
}
AsnType({ type: AsnTypeTypes.Sequence })(SigningCertificateV2);
AsnProp({ type: EssCertIdV2, repeated: 'sequence' })(SigningCertificateV2.prototype, 'certs');

const toBuffer = (a: ArrayBuffer | ArrayBufferView): Buffer =>
  ArrayBuffer.isView(a) ? Buffer.from(a.buffer, a.byteOffset, a.byteLength) : Buffer.from(a);

const sha256 = (b: Buffer): Buffer => createHash('sha256').update(b).digest();

function signatureAlgorithmOf(key: KeyObject): string {
  if (key.asymmetricKeyType === 'ec') return OID.ecdsaWithSha256;
  if (key.asymmetricKeyType === 'rsa') return OID.sha256WithRsa;
  throw new Error(
    `a ${key.asymmetricKeyType ?? 'unknown'} key cannot make a PDF signature here (ECDSA or RSA)`,
  );
}

/** The DER of the SET OF signed attributes, which the signature covers (RFC 5652 5.4); the
 * attributes come already in DER order. */
function signedAttributesDer(attrs: Attribute[]): Buffer {
  const set = new asn1js.Set({ value: attrs.map((a) => asn1js.fromBER(AsnConvert.serialize(a)).result) });
  return toBuffer(set.toBER(false));
}

/** The signed attributes of a SignerInfo as received ([0] IMPLICIT), read back as the universal
 * SET they were signed as: the exact bytes, not a re-encoding. */
function receivedSignedAttributes(signerInfoDer: ArrayBuffer): Buffer | null {
  const parsed = asn1js.fromBER(signerInfoDer);
  if (parsed.offset === -1 || !(parsed.result instanceof asn1js.Sequence)) return null;
  const tagged = parsed.result.valueBlock.value.find(
    (v) => v.idBlock.tagClass === 3 && v.idBlock.tagNumber === 0,
  );
  if (!tagged) return null;
  const der = Buffer.from(toBuffer(tagged.valueBeforeDecodeView));
  der[0] = 0x31;
  return der;
}

/** A detached CAdES B-B signature of `data`; `chain` starts with the signing certificate (DER). */
export function cadesSign(data: Buffer, key: KeyObject, chain: Buffer[]): Buffer {
  const [leafDer] = chain;
  if (!leafDer) throw new Error('no signing certificate');
  const leaf = AsnConvert.parse(leafDer, Certificate);
  const tbs = leaf.tbsCertificate;
  const attribute = (attrType: string, value: unknown) =>
    new Attribute({ attrType, attrValues: [AsnConvert.serialize(value)] });
  // DER orders a SET OF by its encodings.
  const attrs = [
    attribute(OID.contentType, new ObjectIdentifierValue(id_data)),
    attribute(OID.messageDigest, new OctetString(sha256(data))),
    attribute(
      OID.signingCertificateV2,
      new SigningCertificateV2({
        certs: [
          new EssCertIdV2({
            certHash: new OctetString(sha256(leafDer)),
            issuerSerial: new IssuerSerial({
              issuer: new GeneralNames([new GeneralName({ directoryName: tbs.issuer })]),
              serialNumber: tbs.serialNumber,
            }),
          }),
        ],
      }),
    ),
  ].sort((a, b) => Buffer.compare(toBuffer(AsnConvert.serialize(a)), toBuffer(AsnConvert.serialize(b))));
  const toSign = signedAttributesDer(attrs);
  const algorithm = signatureAlgorithmOf(key);
  const signature = sign(
    'sha256',
    toSign,
    key.asymmetricKeyType === 'ec' ? { key, dsaEncoding: 'der' } : key,
  );
  const signedData = new SignedData({
    version: 1,
    digestAlgorithms: new DigestAlgorithmIdentifiers([new AlgorithmIdentifier({ algorithm: OID.sha256 })]),
    encapContentInfo: new EncapsulatedContentInfo({ eContentType: id_data }),
    certificates: new CertificateSet(
      chain.map((der) => new CertificateChoices({ certificate: AsnConvert.parse(der, Certificate) })),
    ),
    signerInfos: new SignerInfos([
      new SignerInfo({
        version: 1,
        sid: new SignerIdentifier({
          issuerAndSerialNumber: new IssuerAndSerialNumber({
            issuer: tbs.issuer,
            serialNumber: tbs.serialNumber,
          }),
        }),
        digestAlgorithm: new AlgorithmIdentifier({ algorithm: OID.sha256 }),
        signedAttrs: attrs,
        signatureAlgorithm: new AlgorithmIdentifier({
          algorithm: algorithm,
          // RFC 4055: sha256WithRSAEncryption carries a NULL parameter; RFC 5758: ECDSA none.
          ...(algorithm === OID.sha256WithRsa ? { parameters: NULL_DER } : {}),
        }),
        signature: new OctetString(signature),
      }),
    ]),
  });
  return toBuffer(
    AsnConvert.serialize(
      new ContentInfo({ contentType: id_signedData, content: AsnConvert.serialize(signedData) }),
    ),
  );
}

const NULL_DER = new Uint8Array([0x05, 0x00]).buffer;

/** An OBJECT IDENTIFIER as an attribute value (the content-type attribute). */
class ObjectIdentifierValue {
  value: string;
  constructor(value = '') {
    this.value = value;
  }
}
AsnType({ type: AsnTypeTypes.Choice })(ObjectIdentifierValue);
AsnProp({ type: AsnPropTypes.ObjectIdentifier })(ObjectIdentifierValue.prototype, 'value');

export interface CmsCheck {
  /** The signing certificate, when the CMS names one it carries. */
  certificate: X509Certificate | null;
  /** What does not hold, in words; empty when the signature verifies. */
  problems: string[];
  /** The signed attributes present, by OID. */
  attributes: string[];
}

/** Checks a detached CMS signature over `data`: the message digest, the signature with the
 * signer's certificate, and the signing-certificate-v2 attribute against that certificate. */
export function cadesVerify(cms: Buffer, data: Buffer): CmsCheck {
  const problems: string[] = [];
  let sd: SignedData;
  try {
    const ci = AsnConvert.parse(cms, ContentInfo);
    if (ci.contentType !== id_signedData)
      return { certificate: null, problems: ['the signature is not CMS SignedData'], attributes: [] };
    sd = AsnConvert.parse(ci.content, SignedData);
  } catch {
    return {
      certificate: null,
      problems: ['the signature value is not a readable CMS structure'],
      attributes: [],
    };
  }
  const si = sd.signerInfos[0];
  if (!si || sd.signerInfos.length !== 1)
    return { certificate: null, problems: ['the signature must have exactly one signer'], attributes: [] };
  const ias = si.sid.issuerAndSerialNumber;
  const certs = (sd.certificates ?? []).map((c) => c.certificate).filter((c): c is Certificate => !!c);
  const leaf = certs.find(
    (c) =>
      ias &&
      toBuffer(c.tbsCertificate.serialNumber).equals(toBuffer(ias.serialNumber)) &&
      toBuffer(AsnConvert.serialize(c.tbsCertificate.issuer)).equals(
        toBuffer(AsnConvert.serialize(ias.issuer)),
      ),
  );
  if (!leaf)
    return {
      certificate: null,
      problems: ['the signature does not carry its signing certificate'],
      attributes: [],
    };
  const leafDer = toBuffer(AsnConvert.serialize(leaf));
  const certificate = new X509Certificate(leafDer);
  const attrs = si.signedAttrs ?? [];
  const attr = (oid: string) => attrs.find((a) => a.attrType === oid)?.attrValues[0];
  if (si.digestAlgorithm.algorithm !== OID.sha256) problems.push('the signature does not use SHA-256');
  const md = attr(OID.messageDigest);
  const digest = md ? toBuffer(AsnConvert.parse(md, OctetString).buffer) : null;
  if (!digest) problems.push('the signature has no message-digest attribute');
  else if (!digest.equals(sha256(data)))
    problems.push(
      'the signed bytes have changed: their SHA-256 is not the message digest the signature covers',
    );
  const sc = attr(OID.signingCertificateV2);
  if (!sc) problems.push('the signature has no ESS signing-certificate-v2 attribute (CAdES B-B)');
  else {
    const ids = AsnConvert.parse(sc, SigningCertificateV2).certs;
    const first = ids[0];
    const hashOk =
      first !== undefined &&
      (first.hashAlgorithm === undefined || first.hashAlgorithm.algorithm === OID.sha256) &&
      toBuffer(first.certHash.buffer).equals(sha256(leafDer));
    if (!hashOk)
      problems.push(
        'the signing-certificate-v2 attribute names another certificate than the one that signed',
      );
  }
  let verified = false;
  try {
    const key = createPublicKey(certificate.publicKey.export({ type: 'spki', format: 'pem' }));
    const toVerify = receivedSignedAttributes(AsnConvert.serialize(si));
    if (!toVerify) throw new Error('no signed attributes');
    const value = toBuffer(si.signature.buffer);
    verified = verify(
      'sha256',
      toVerify,
      key.asymmetricKeyType === 'ec' ? { key, dsaEncoding: 'der' } : key,
      value,
    );
  } catch {
    verified = false;
  }
  if (!verified)
    problems.push("the signature value does not verify with the signing certificate's public key");
  return { certificate, problems, attributes: attrs.map((a) => a.attrType) };
}
