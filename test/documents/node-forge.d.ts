// The small part of node-forge (no bundled types) the tests use to make a throwaway PKCS#12.
declare module 'node-forge' {
  interface Bytes {
    getBytes(): string;
  }
  interface KeyPair {
    publicKey: object;
    privateKey: object;
  }
  interface Certificate {
    publicKey: object;
    serialNumber: string;
    validity: { notBefore: Date; notAfter: Date };
    setSubject(attrs: { name: string; value: string }[]): void;
    setIssuer(attrs: { name: string; value: string }[]): void;
    setExtensions(ext: Record<string, unknown>[]): void;
    sign(key: object, md: object): void;
  }
  const forge: {
    options: { usePureJavaScript: boolean };
    pki: {
      rsa: { generateKeyPair(o: { bits: number; e: number }): KeyPair };
      createCertificate(): Certificate;
    };
    md: { sha256: { create(): object } };
    pkcs12: {
      toPkcs12Asn1(key: object, certs: Certificate[], password: string, o: { algorithm: string }): object;
    };
    asn1: { toDer(asn1: object): Bytes };
  };
  export default forge;
}
