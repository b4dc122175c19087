import { closeSync, openSync, readSync } from 'node:fs';
import { setImmediate as nextTurn, setTimeout as sleep } from 'node:timers/promises';

/** What the reader expects of the spool file's pixels. */
export interface FeedShape {
  width: number;
  height: number;
  channels: number;
  depth: 8 | 16;
}

/** Progress states in `progress[0]` (src/worker.ts reads them). */
export const FEEDING = 0;
export const FED = 1;
export const FEED_FAILED = 2;

/**
 * libvips' uncompressed image file ('.v'): a 64-byte header of little-endian 32-bit fields
 * (magic, width, height, bands, bits per band, band format, coding, ...) and then the pixels,
 * row by row, samples interleaved, in the writing machine's byte order; metadata follows them.
 * Layout from libvips' vips.c (vips__read_header_bytes); band formats 0 = uchar, 2 = ushort.
 */
const HEADER_BYTES = 64;
const MAGIC = [0xb6, 0xa6, 0xf2, 0x08];

/** Most bytes copied by one read: on a memory-backed folder a read is a copy, well under a ms. */
const CHUNK_BYTES = 4 * 2 ** 20;

/** Why a header does not describe the pixels expected, or null when it does. */
export function headerMismatch(header: Uint8Array, shape: FeedShape): string | null {
  if (header.length < HEADER_BYTES || MAGIC.some((b, i) => header[i] !== b)) return 'not a libvips image file';
  const v = new DataView(header.buffer, header.byteOffset, HEADER_BYTES);
  const field = (i: number) => v.getInt32(4 + 4 * i, true);
  const [width, height, bands] = [field(0), field(1), field(2)];
  const format = field(4);
  const coding = field(5);
  if (width !== shape.width || height !== shape.height) return `the file is ${width}x${height}, not ${shape.width}x${shape.height}`;
  if (bands !== shape.channels) return `the file has ${bands} bands, not ${shape.channels}`;
  if (format !== (shape.depth === 16 ? 2 : 0) || coding !== 0) return `the file's samples are not ${shape.depth}-bit unsigned`;
  return null;
}

/** A spool file being read into shared memory as it is written. */
export interface Feed {
  /** Int32Array buffer of [state, rowsReady] for the workers (src/worker.ts). */
  progress: SharedArrayBuffer;
  /** Settles once every row is in `target`; rejects when the writer failed or the file is short or wrong. */
  done: Promise<void>;
  /** Stops reading (the render was called off): waiting workers are told to give up. */
  stop(): void;
}

/**
 * Copies the pixels of the libvips image file at `path` into `target` while a decoder is still
 * writing it (src/media/decode.ts startSpooledDecode; `written` settles when it finishes), and
 * publishes how many whole rows are in: after each read, progress[1] = rows and
 * Atomics.notify, so workers resample the top of the image during the decode of the rest.
 * Reads whatever the file holds (the file system's reads are atomic per call and the writer
 * only appends); when a read finds nothing new it waits a millisecond. A writer that fails,
 * or finishes short of `height` rows, fails the feed (progress[0] = FEED_FAILED).
 *
 * The reads are synchronous, at most CHUNK_BYTES each with a turn of the event loop between
 * them: sharp holds a thread of libuv's pool (4 by default) for the whole of each decode and
 * encode, so asynchronous reads would queue behind the very decodes they follow (with four
 * spooled decodes at once, no row arrived before its decode had ended).
 */
export function feedFromSpool(path: string, shape: FeedShape, target: SharedArrayBuffer, written: Promise<void>): Feed {
  const progress = new SharedArrayBuffer(8);
  const p = new Int32Array(progress);
  let stopped = false;
  let finished = false;
  let failure: unknown;
  written.then(
    () => (finished = true),
    (e: unknown) => (failure = e),
  );
  const rowBytes = shape.width * shape.channels * (shape.depth / 8);
  const total = rowBytes * shape.height;
  const into = new Uint8Array(target, 0, total);

  /** Reads from `at` into `buf`, waiting while the file holds nothing new; the bytes read. */
  async function readSome(fd: number, buf: Uint8Array, at: number): Promise<number> {
    for (;;) {
      await nextTurn();
      if (stopped) throw new Error('the render was called off');
      if (failure !== undefined) throw failure;
      const wasFinished = finished;
      const bytesRead = readSync(fd, buf, 0, Math.min(buf.length, CHUNK_BYTES), at);
      if (bytesRead > 0) return bytesRead;
      if (wasFinished) throw new Error('the spool file ended before its last row');
      await sleep(1);
    }
  }

  /** The file's descriptor, once the writer has made it. */
  async function opened(): Promise<number> {
    for (;;) {
      const wasFinished = finished;
      try {
        return openSync(path, 'r');
      } catch (e) {
        if ((e as NodeJS.ErrnoException).code !== 'ENOENT' || wasFinished || failure !== undefined || stopped) throw e;
      }
      await sleep(1);
    }
  }

  async function run(): Promise<void> {
    const fd = await opened();
    try {
      const header = new Uint8Array(HEADER_BYTES);
      for (let got = 0; got < HEADER_BYTES; ) got += await readSome(fd, header.subarray(got), got);
      const wrong = headerMismatch(header, shape);
      if (wrong) throw new Error(`spool file: ${wrong}`);
      for (let loaded = 0; loaded < total; ) {
        loaded += await readSome(fd, into.subarray(loaded), HEADER_BYTES + loaded);
        Atomics.store(p, 1, Math.floor(loaded / rowBytes));
        Atomics.notify(p, 1);
      }
      Atomics.store(p, 0, FED);
    } finally {
      closeSync(fd);
    }
  }

  const done = run().catch((e: unknown) => {
    Atomics.store(p, 0, FEED_FAILED);
    Atomics.notify(p, 1);
    // The writer's own error says more than the reader's.
    throw failure ?? e;
  });
  // Whoever holds the feed sees the failure through `done`; it is not an unhandled rejection
  // while they are still busy elsewhere (stop() may fail it at any moment).
  done.catch(() => undefined);
  return {
    progress,
    done,
    stop() {
      stopped = true;
      Atomics.store(p, 0, FEED_FAILED);
      Atomics.notify(p, 1);
    },
  };
}
