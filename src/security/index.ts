/** Signed URLs: the public surface of src/security (used by the app, the CLI and embedders). */
export {
  canonicalSigningPath,
  canonicalSigningQuery,
  signatureParam,
  signUrl,
  verifySignature,
  type QueryInput,
  type SignatureCheck,
} from './signing.js';
