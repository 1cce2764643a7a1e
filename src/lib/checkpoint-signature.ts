/**
 * Signed audit checkpoints: the service signs an organisation's audit head
 * (its last row's sequence number and hash) with an Ed25519 key held outside
 * the database (RFC 8032, through node:crypto). Whoever holds only the public
 * key and an export can then prove that the chain up to that row is the one
 * that was signed: a rewritten chain gives another hash at that row, a cut
 * one has no row there. Nothing here touches the database.
 */
import { createHash, createPrivateKey, createPublicKey, sign, verify, type KeyObject } from 'node:crypto';
import { canonicalJson } from './canonical-json.js';

/** What a checkpoint states. */
export interface CheckpointClaim {
  organisationId: string;
  seq: number;
  headHash: string;
  /** ISO-8601 UTC time of signing. */
  signedAt: string;
}

export interface SignedCheckpoint extends CheckpointClaim {
  /** First 16 hex digits of SHA-256 of the public key (SubjectPublicKeyInfo, DER). */
  keyId: string;
  /** Ed25519 signature of checkpointMessage(claim), base64. */
  signature: string;
}

/** The exact bytes signed: a fixed prefix (so a signature means nothing in another context) and the claim as canonical JSON. */
export function checkpointMessage(claim: CheckpointClaim): Buffer {
  const { organisationId, seq, headHash, signedAt } = claim;
  return Buffer.from(
    `mvledger audit checkpoint v1\n${canonicalJson({ organisationId, seq, headHash, signedAt })}`,
    'utf8',
  );
}

/** The id of a public key, as checkpoints name it. */
export function publicKeyId(publicKey: KeyObject): string {
  return createHash('sha256')
    .update(publicKey.export({ type: 'spki', format: 'der' }))
    .digest('hex')
    .slice(0, 16);
}

/** Signs checkpoints with one Ed25519 private key. */
export interface CheckpointSigner {
  keyId: string;
  /** The public key, PEM (SubjectPublicKeyInfo): what an auditor is given. */
  publicKeyPem: string;
  sign(claim: CheckpointClaim): SignedCheckpoint;
}

/**
 * A signer from a PEM (PKCS #8) Ed25519 private key. Throws a plain message
 * (never the key) when the text is not one.
 */
export function checkpointSigner(privateKeyPem: string): CheckpointSigner {
  let privateKey: KeyObject;
  try {
    privateKey = createPrivateKey({ key: privateKeyPem, format: 'pem' });
  } catch {
    throw new Error('the checkpoint key is not a PEM private key');
  }
  if (privateKey.asymmetricKeyType !== 'ed25519')
    throw new Error(`the checkpoint key must be Ed25519 (got ${privateKey.asymmetricKeyType ?? 'unknown'})`);
  const publicKey = createPublicKey(privateKey);
  const keyId = publicKeyId(publicKey);
  return {
    keyId,
    publicKeyPem: publicKey.export({ type: 'spki', format: 'pem' }).toString(),
    sign: (claim) => ({
      ...claim,
      keyId,
      signature: sign(null, checkpointMessage(claim), privateKey).toString('base64'),
    }),
  };
}

/** Why a checkpoint's signature does not hold under this public key, or null when it does. */
export function checkpointSignatureFault(checkpoint: SignedCheckpoint, publicKeyPem: string): string | null {
  let publicKey: KeyObject;
  try {
    publicKey = createPublicKey({ key: publicKeyPem, format: 'pem' });
  } catch {
    return 'the public key is not a PEM public key';
  }
  if (publicKey.asymmetricKeyType !== 'ed25519') return 'the public key is not an Ed25519 key';
  if (checkpoint.keyId !== publicKeyId(publicKey))
    return `it was signed by key ${checkpoint.keyId}, not by this public key (${publicKeyId(publicKey)})`;
  const signature = Buffer.from(checkpoint.signature, 'base64');
  if (signature.length !== 64 || !verify(null, checkpointMessage(checkpoint), publicKey, signature))
    return 'its signature does not verify';
  return null;
}
