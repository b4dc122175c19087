/**
 * Recognises an accepted source format from its first bytes (its file signature), so bytes
 * that start like one of our formats but that libvips cannot open are reported as corrupt
 * (422), not as a format we do not read (415): a TIFF cut before its first IFD is such a case.
 */

const startsWith = (bytes: Buffer, at: number, signature: readonly number[]): boolean =>
  bytes.length >= at + signature.length && signature.every((b, i) => bytes[at + i] === b);

const ascii = (text: string): number[] => [...text].map((c) => c.charCodeAt(0));

/** Signatures: JPEG (ITU-T T.81 SOI + marker), PNG (PNG spec §5.2), GIF87a/89a, RIFF/WEBP, TIFF (TIFF 6.0 §2), ISO BMFF ftyp with an AVIF brand. */
const signatures: readonly ((bytes: Buffer) => boolean)[] = [
  (b) => startsWith(b, 0, [0xff, 0xd8, 0xff]),
  (b) => startsWith(b, 0, [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
  (b) => startsWith(b, 0, ascii('GIF87a')) || startsWith(b, 0, ascii('GIF89a')),
  (b) => startsWith(b, 0, ascii('RIFF')) && startsWith(b, 8, ascii('WEBP')),
  (b) => startsWith(b, 0, [0x49, 0x49, 0x2a, 0x00]) || startsWith(b, 0, [0x4d, 0x4d, 0x00, 0x2a]),
  (b) => startsWith(b, 4, ascii('ftypavi')),
];

/** True when `bytes` begin with the signature of a source format foldwise accepts. */
export function hasAcceptedSignature(bytes: Buffer): boolean {
  return signatures.some((test) => test(bytes));
}
