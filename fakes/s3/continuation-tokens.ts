// s3rver seals ListObjectsV2's continuation tokens with single DES ("des"),
// which OpenSSL 3 keeps only in its legacy provider: on Node 20 every listing
// of more than 1000 keys (a reduction's tiles, a large set's work pieces) failed
// with InternalError when s3rver made the token for the next page. Triple DES
// with the key given three times is the same cipher (encrypt, decrypt, encrypt
// with one key is one encryption) and stays in OpenSSL's default provider, so
// the fake's process makes its "des" ciphers that way: the same tokens, byte for
// byte, and no process-wide flag.
import crypto from "node:crypto";

type CipherFactory = (algorithm: string, key: crypto.CipherKey, iv: crypto.BinaryLike | null, options?: unknown) => unknown;

/** The "des" algorithm as triple DES with its 8-byte key repeated; anything else unchanged. */
function asTripleDes(algorithm: string, key: crypto.CipherKey): [string, crypto.CipherKey] {
  if (algorithm.toLowerCase() !== "des" || !Buffer.isBuffer(key) || key.length !== 8) return [algorithm, key];
  return ["des-ede3-cbc", Buffer.concat([key, key, key])];
}

/** Makes crypto's "des" ciphers triple DES with one key, for s3rver's continuation tokens. */
export function sealTokensWithoutLegacyDes(): void {
  const mutable = crypto as unknown as { createCipheriv: CipherFactory; createDecipheriv: CipherFactory };
  const createCipheriv = mutable.createCipheriv;
  const createDecipheriv = mutable.createDecipheriv;
  mutable.createCipheriv = (algorithm, key, iv, options) => createCipheriv(...asTripleDes(algorithm, key), iv, options);
  mutable.createDecipheriv = (algorithm, key, iv, options) => createDecipheriv(...asTripleDes(algorithm, key), iv, options);
}
