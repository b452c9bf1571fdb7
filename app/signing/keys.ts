// Electronic signatures of records: Ed25519 key pairs (RFC 8032) from node:crypto, the private
// key sealed at rest with AES-256-GCM under a key derived from the signer's passphrase by
// scrypt (RFC 7914), and the canonical bytes a signature covers (JSON Canonicalization Scheme,
// RFC 8785, app/signing/canonical-json.ts). No secret ever leaves this module except as
// the sealed form; a wrong passphrase is told apart from a damaged key by GCM's tag failing.
import {
  createCipheriv,
  createDecipheriv,
  createHash,
  createPrivateKey,
  createPublicKey,
  generateKeyPairSync,
  randomBytes,
  scryptSync,
  sign,
  verify,
  type KeyObject,
} from 'node:crypto';
import { canonicalJson } from './canonical-json';
import { encodeJson } from '../model/json';

/** scrypt cost: N = 2^15, r = 8, p = 1 takes about 0.1 s and 32 MiB, the interactive-login
 * setting of the scrypt paper (Percival 2009) raised one step; kept per key so it can grow. */
export const KDF_DEFAULTS = { n: 2 ** 15, r: 8, p: 1 } as const;
const KEY_BYTES = 32;

/** 21 CFR 11.300 asks for controls on passwords; ours: at least this long, at most 1024. */
export const MIN_PASSPHRASE_LENGTH = 10;

export interface SealedKey {
  publicKeyPem: string;
  /** SHA-256 of the public key (SPKI DER), hex: short enough to print, unique per key. */
  fingerprint: string;
  kdf: 'scrypt';
  kdfN: number;
  kdfR: number;
  kdfP: number;
  saltB64: string;
  ivB64: string;
  tagB64: string;
  encryptedPrivateKeyB64: string;
}

function deriveKey(passphrase: string, salt: Buffer, n: number, r: number, p: number): Buffer {
  // maxmem must exceed 128 * N * r bytes, or node refuses the derivation.
  return scryptSync(passphrase.normalize('NFC'), salt, KEY_BYTES, {
    N: n,
    r,
    p,
    maxmem: 256 * n * r + 1024 * 1024,
  });
}

export function fingerprintOf(publicKeyPem: string): string {
  const der = createPublicKey(publicKeyPem).export({ type: 'spki', format: 'der' });
  return createHash('sha256').update(der).digest('hex');
}

/** A new Ed25519 key pair, the private half sealed under the passphrase. */
export function generateSealedKey(
  passphrase: string,
  kdf: { n: number; r: number; p: number } = KDF_DEFAULTS,
): SealedKey {
  const { publicKey, privateKey } = generateKeyPairSync('ed25519');
  const publicKeyPem = publicKey.export({ type: 'spki', format: 'pem' }).toString();
  const fingerprint = fingerprintOf(publicKeyPem);
  const salt = randomBytes(16);
  const iv = randomBytes(12);
  const key = deriveKey(passphrase, salt, kdf.n, kdf.r, kdf.p);
  const cipher = createCipheriv('aes-256-gcm', key, iv);
  // The fingerprint is authenticated with the ciphertext, so a sealed key moved to another
  // public key's row does not open.
  cipher.setAAD(Buffer.from(fingerprint, 'utf8'));
  const der = privateKey.export({ type: 'pkcs8', format: 'der' });
  const encrypted = Buffer.concat([cipher.update(der), cipher.final()]);
  return {
    publicKeyPem,
    fingerprint,
    kdf: 'scrypt',
    kdfN: kdf.n,
    kdfR: kdf.r,
    kdfP: kdf.p,
    saltB64: salt.toString('base64'),
    ivB64: iv.toString('base64'),
    tagB64: cipher.getAuthTag().toString('base64'),
    encryptedPrivateKeyB64: encrypted.toString('base64'),
  };
}

/** The private key, or undefined when the passphrase does not open it (nothing else is said). */
export function unsealPrivateKey(sealed: SealedKey, passphrase: string): KeyObject | undefined {
  const key = deriveKey(
    passphrase,
    Buffer.from(sealed.saltB64, 'base64'),
    sealed.kdfN,
    sealed.kdfR,
    sealed.kdfP,
  );
  const decipher = createDecipheriv('aes-256-gcm', key, Buffer.from(sealed.ivB64, 'base64'));
  decipher.setAAD(Buffer.from(sealed.fingerprint, 'utf8'));
  decipher.setAuthTag(Buffer.from(sealed.tagB64, 'base64'));
  let der: Buffer;
  try {
    der = Buffer.concat([
      decipher.update(Buffer.from(sealed.encryptedPrivateKeyB64, 'base64')),
      decipher.final(),
    ]);
  } catch {
    return undefined;
  }
  return createPrivateKey({ key: der, format: 'der', type: 'pkcs8' });
}

/** RFC 8785 bytes of a value. Non-finite numbers (infinite degrees of freedom) travel as the
 * strings the rest of the product uses, since JSON and JCS have no Infinity. */
export function canonicalBytes(value: unknown): Buffer {
  const plain: unknown = JSON.parse(encodeJson(value));
  return Buffer.from(canonicalJson(plain), 'utf8');
}

export const sha256Hex = (bytes: Buffer): string => createHash('sha256').update(bytes).digest('hex');

/** Ed25519 takes no separate digest: the algorithm argument is null (RFC 8032 PureEdDSA). */
export function signBytes(privateKey: KeyObject, bytes: Buffer): string {
  return sign(null, bytes, privateKey).toString('base64');
}

export function verifyBytes(publicKeyPem: string, bytes: Buffer, signatureB64: string): boolean {
  try {
    return verify(null, bytes, createPublicKey(publicKeyPem), Buffer.from(signatureB64, 'base64'));
  } catch {
    return false;
  }
}
