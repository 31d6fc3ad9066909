// Ed25519 signatures over canonical JSON, and the checks every signed kvarbook document shares.
import { sign, verify, type KeyObject } from 'node:crypto';
import { z } from 'zod';
import { canonicalBytes, canonicalJson } from './canonical.ts';
import { SealError } from './errors.ts';
import { checkIdentity, keyBelongsTo, publicIdentitySchema, type PublicIdentity } from './keys.ts';
import { describeSigner, findTrusted, sameDetails } from './trust.ts';

const ED25519_SIGNATURE_BYTES = 64;

/**
 * Only the one base64 spelling of 64 bytes is accepted: a decoder ignores the unused low bits of
 * the last character, so without this a changed character could leave the signature "valid".
 */
const signatureBase64Schema = z.string().refine((text) => {
  const bytes = Buffer.from(text, 'base64');
  return bytes.length === ED25519_SIGNATURE_BYTES && bytes.toString('base64') === text;
}, `must be the standard base64 spelling of a ${ED25519_SIGNATURE_BYTES}-byte Ed25519 signature`);

/**
 * The one shape of a signed kvarbook document (a seal envelope, a check record): its format, the signed part, the signer's
 * identity once more outside the signed part, and the signature over the signed part's canonical JSON.
 */
export function signedDocumentSchema<Format extends string, PartName extends string, Part extends z.ZodType, SignerName extends string>(
  format: Format,
  partName: PartName,
  part: Part,
  signerName: SignerName,
) {
  return z.strictObject({
    format: z.literal(format),
    ...({ [partName]: part } as { [name in PartName]: Part }),
    ...({ [signerName]: publicIdentitySchema } as { [name in SignerName]: typeof publicIdentitySchema }),
    signatureBase64: signatureBase64Schema,
  });
}

/** Signs the canonical JSON of `payload`, after making sure the key really is the identity's. */
export function signCanonical(payload: unknown, privateKey: KeyObject, identity: PublicIdentity): string {
  const checked = checkIdentity(identity, 'signer');
  if (!checked.ok) {
    throw new SealError({
      code: 'seal-invalid-identity-field',
      message: `The signer identity is not valid: ${checked.problems.join('; ')}.`,
      quantity: 'signer identity',
      hint: 'Use the identity JSON written when the key was created.',
    });
  }
  if (privateKey.asymmetricKeyType !== 'ed25519' || !keyBelongsTo(privateKey, identity)) {
    throw new SealError({
      code: 'seal-key-identity-mismatch',
      message: `The private key is not the key of ${describeSigner(identity)} (${identity.fingerprint}).`,
      quantity: 'private key',
      hint: 'Unlock the key whose fingerprint matches the identity you sign as.',
    });
  }
  return sign(null, canonicalBytes(payload), privateKey).toString('base64');
}

export interface SignatureCheck {
  /** The signature verifies over the signed part with the signer's own key. */
  signatureValid: boolean;
  /** The signer's key is on the trust list (by fingerprint and key bytes). Means nothing unless signatureValid. */
  trusted: boolean;
  signer: PublicIdentity | null;
  problems: string[];
}

export interface SignedParts {
  /** What the signature covers; it names its signer in `signedSigner`. */
  signedPart: unknown;
  signedSigner: PublicIdentity;
  /** The signer repeated outside the signed part, for readers; it must equal the signed one. */
  outerSigner: PublicIdentity;
  signatureBase64: string;
  where: string;
}

export function checkSignedParts(parts: SignedParts, trusted: readonly PublicIdentity[]): SignatureCheck {
  const problems: string[] = [];
  const identityCheck = checkIdentity(parts.outerSigner, `${parts.where}.signer`);
  if (!identityCheck.ok) {
    return { signatureValid: false, trusted: false, signer: null, problems: identityCheck.problems };
  }
  const signer = identityCheck.identity;
  if (canonicalJson(parts.signedSigner) !== canonicalJson(parts.outerSigner)) {
    problems.push(`${parts.where}.signer: differs from the signer inside the signed part`);
  }
  const signatureValid = verify(null, canonicalBytes(parts.signedPart), identityCheck.publicKey, Buffer.from(parts.signatureBase64, 'base64'));
  if (!signatureValid) {
    problems.push(
      `${parts.where}.signatureBase64: does not verify with the key of ${describeSigner(signer)}; the signed content was changed after signing or signed by another key`,
    );
  }
  const trustedEntry = findTrusted(signer, trusted);
  if (trustedEntry === undefined) {
    problems.push(`${parts.where}.signer: ${describeSigner(signer)} (${signer.fingerprint}) is not on the trust list`);
  } else if (!sameDetails(trustedEntry, signer)) {
    problems.push(`${parts.where}.signer: the key is trusted as ${describeSigner(trustedEntry)}, but the document names ${describeSigner(signer)}`);
  }
  return { signatureValid, trusted: trustedEntry !== undefined, signer, problems };
}
