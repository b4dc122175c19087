import { classify, type DecodeLimits, type DecodeWish, prepare, stillSrgb, withinDecodeDeadline } from './decode-setup.js';

/**
 * The spool file could not be written (folder gone, file system full), or not read back (out
 * of file descriptors, an I/O error): nothing is wrong with the source, so the caller decodes
 * it in memory instead.
 */
export class SpoolWriteError extends Error {
  override name = 'SpoolWriteError';
}

/** libvips' words for a failed file write (vips_target / vips__file_write; seen with sharp 0.35). */
const WRITE_FAILURE = /unable to write|write failed|no space left|disk quota/i;

/** A source whose decode can be written row by row to a spool file; its header is checked. */
export interface SpoolableSource {
  width: number;
  height: number;
  /** 1 (grey) or 3 (RGB): sources with alpha are not spooled. */
  channels: 1 | 3;
  depth: 8 | 16;
  format: string;
  /**
   * Decodes into the file `path` (its name must end in `.v`, libvips' uncompressed format), as
   * decodeImage would (upright, sRGB, 8 or 16 bits) but row by row as libvips decodes them, so a
   * reader can start on the top rows while the bottom ones are still being decoded
   * (src/pool/spool/rows.ts). Settles when the last row is written; rejects with decodeImage's
   * errors (ERR_SOURCE_CORRUPT, ERR_LIMIT_DECODE_TIMEOUT, ...), or SpoolWriteError.
   */
  write(path: string): Promise<void>;
  /**
   * Settles once libvips has stopped writing every file `write` was asked for: possibly later
   * than write's own promise, which the decode deadline settles while libvips runs on to its
   * own timeout, and whose job waits for a libuv pool thread before it starts at all.
   */
  idle(): Promise<void>;
}

/**
 * Reads and checks the header of `bytes` as decodeImage does (same errors), and says how the
 * decode would be spooled; null for a source with alpha, whose opacity is known only after
 * the last row (decodeImage serves it, and drops an alpha that turns out opaque); null too for
 * a source kept wide (Display P3) or animated, which decodeImage serves with their tags.
 */
export async function probeSpooledDecode(bytes: Buffer, limits: DecodeLimits, wish: DecodeWish = stillSrgb): Promise<SpoolableSource | null> {
  // The header read is under the decode deadline too, as in decodeImage.
  const p = await withinDecodeDeadline(prepare(bytes, limits, wish), limits.timeoutMs);
  const { pipeline, format, width, height, deep, grey, hasAlpha } = p;
  if (hasAlpha || p.gamut !== 'srgb' || p.animation) return null;
  let jobs: Promise<unknown> = Promise.resolve();
  const write = (path: string) => {
    const job = pipeline.toFile(path);
    jobs = Promise.allSettled([jobs, job]);
    return withinDecodeDeadline(
      job.then(
        () => undefined,
        (e: unknown) => {
          const message = e instanceof Error ? e.message : String(e);
          throw WRITE_FAILURE.test(message) ? new SpoolWriteError(`the spool file ${path} could not be written`, { cause: e }) : classify(e);
        },
      ),
      limits.timeoutMs,
    );
  };
  const idle = () => jobs.then(() => undefined);
  return { width, height, channels: grey ? 1 : 3, depth: deep ? 16 : 8, format, write, idle };
}
