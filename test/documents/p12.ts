// A throwaway self-signed certificate and key as a PKCS#12 (made with node-forge), for the
// tests of signing with the lab's own PKCS#12.
import forge from 'node-forge';

/** A throwaway self-signed certificate and key as PKCS#12, made with node-forge. */
export function throwawayP12(passphrase: string): Buffer {
  const keys = forge.pki.rsa.generateKeyPair({ bits: 2048, e: 0x10001 });
  const c = forge.pki.createCertificate();
  c.publicKey = keys.publicKey;
  c.serialNumber = '01';
  c.validity.notBefore = new Date('2026-01-01T00:00:00Z');
  c.validity.notAfter = new Date('2036-01-01T00:00:00Z');
  const attrs = [
    { name: 'commonName', value: 'Kestrel Row test signer' },
    { name: 'organizationName', value: 'Invented test laboratory' },
  ];
  c.setSubject(attrs);
  c.setIssuer(attrs);
  c.setExtensions([
    { name: 'basicConstraints', cA: false },
    { name: 'keyUsage', digitalSignature: true, nonRepudiation: true },
  ]);
  c.sign(keys.privateKey, forge.md.sha256.create());
  const p12 = forge.pkcs12.toPkcs12Asn1(keys.privateKey, [c], passphrase, { algorithm: '3des' });
  return Buffer.from(forge.asn1.toDer(p12).getBytes(), 'binary');
}
