import { closeSync, openSync, readSync } from 'node:fs';
import { epochNow, tracing, WaitSpans } from '../trace.js';
import { StagingBuffers } from '../staging.js';

/** What the reader expects of the spool file's pixels. */
export interface SpoolShape {
  width: number;
  height: number;
  channels: number;
  depth: 8 | 16;
}

/** States of the writer in `state[0]`, set by the render pool (RenderPool.resampleSpooled). */
export const WRITING = 0;
export const WRITTEN = 1;
export const STOPPED = 2;

/**
 * libvips' uncompressed image file ('.v'): a 64-byte header of little-endian 32-bit fields
 * (magic, width, height, bands, bits per band, band format, coding, ...) and then the pixels,
 * row by row, samples interleaved, in the writing machine's byte order; metadata follows them.
 * Layout from libvips' vips.c (vips__read_header_bytes); band formats 0 = uchar, 2 = ushort.
 */
const HEADER_BYTES = 64;
const MAGIC = [0xb6, 0xa6, 0xf2, 0x08];

/** Rows read at once: about 1 MiB, so a block stays in the core's cache while it is resampled. */
const BLOCK_BYTES = 2 ** 20;

/**
 * Blocks closed readers left, for this thread's next readers: a fresh block is new memory, and
 * on a machine that hands freed memory back to its host (a virtual machine with free page
 * reporting) every first touch of it is a page fault, for the reader and for the libvips
 * threads that fill the spool file meanwhile (measured: `scripts/bench/cpu.ts`, see
 * docs/speed.md). Two blocks (a render's and an analysis's) of at most 8 MiB each.
 */
const blocks = new StagingBuffers(2, 8 * 2 ** 20, (bytes) => new ArrayBuffer(bytes));

/** The rows a reader's block holds: about BLOCK_BYTES, at least `minRows` (and one), at most the image. */
export function blockRows(shape: SpoolShape, minRows = 1): number {
  const rowBytes = shape.width * shape.channels * (shape.depth / 8);
  return Math.max(1, Math.min(shape.height, Math.max(minRows, Math.floor(BLOCK_BYTES / rowBytes))));
}

/** Why a header does not describe the pixels expected, or null when it does. */
export function headerMismatch(header: Uint8Array, shape: SpoolShape): string | null {
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

/**
 * Why a spool file's rows could not be read. 'unreadable': the file could not be opened or read
 * (EMFILE, EIO, ...); 'wrong-file': it is not what was written for this render (wrong header,
 * ends early); neither says anything about the source. 'stopped': the render was called off
 * (the decode failed, a deadline passed).
 */
export type SpoolFault = 'unreadable' | 'wrong-file' | 'stopped';

/** What SpoolRows throws; the worker returns it as a typed outcome (worker.ts: BandOutcome). */
export class SpoolReadError extends Error {
  constructor(
    readonly fault: SpoolFault,
    message: string,
  ) {
    super(message);
    this.name = 'SpoolReadError';
  }
}

const messageOf = (e: unknown) => (e as Error).message;

/**
 * Source rows read from a spool file that libvips may still be writing (src/codec/spool-decode.ts),
 * for renderRaster's rowAt: the worker thread resamples the top of the image while the rest is
 * decoded. Rows are read straight from the file, a block of about 1 MiB at a time, into this
 * reader's own buffer (no copy of the whole source anywhere). A row not yet written is waited
 * for: Atomics.wait on `state` for a millisecond at a time, woken early when the pool marks
 * the writer WRITTEN or STOPPED. Throws SpoolReadError once the render is STOPPED (decode
 * failed, deadline), when the file ends before a row once WRITTEN, and when it cannot be read. Synchronous: for
 * worker threads, where blocking waits cost nothing else.
 */
export class SpoolRows {
  private fd = -1;
  private readonly rowBytes: number;
  private buffer: ArrayBuffer | null;
  private readonly block: Uint8Array;
  private readonly samples: Uint8Array | Uint16Array;
  private first = 0;
  private count = 0;
  /** With FOLDWISE_TIMELINE=1 (trace.ts), when this reader waited for rows not yet written. */
  readonly waited = tracing ? new WaitSpans() : undefined;

  /** `minRows`: rows the block holds at least (a reader that goes back up to that many rows, as the analysis's tiles do). */
  constructor(
    private readonly path: string,
    private readonly shape: SpoolShape,
    private readonly state: Int32Array,
    minRows = 1,
  ) {
    this.rowBytes = shape.width * shape.channels * (shape.depth / 8);
    const bytes = blockRows(shape, minRows) * this.rowBytes;
    const buffer = blocks.take(bytes);
    this.buffer = buffer;
    this.block = new Uint8Array(buffer, 0, bytes);
    this.samples = shape.depth === 16 ? new Uint16Array(buffer, 0, bytes / 2) : this.block;
  }

  /** renderRaster's rowAt: row y, read (and waited for) when it is not in the block already. */
  readonly rowAt = (y: number): { data: Uint8Array | Uint16Array; at: number } => {
    if (y < this.first || y >= this.first + this.count) this.load(y);
    const n = this.shape.width * this.shape.channels;
    return { data: this.samples, at: (y - this.first) * n };
  };

  /**
   * Closes the file (the reader may be dropped at any point) and leaves its block to the
   * thread's next reader: rows it handed out are not to be read after this.
   */
  close(): void {
    if (this.fd >= 0) closeSync(this.fd);
    this.fd = -1;
    if (this.buffer) blocks.give(this.buffer);
    this.buffer = null;
    this.count = 0; // any later rowAt goes to load, which refuses
  }

  private load(y: number): void {
    if (!this.buffer) throw new SpoolReadError('stopped', 'the reader is closed');
    if (this.fd < 0) this.open();
    const want = Math.min(this.block.length, (this.shape.height - y) * this.rowBytes);
    for (;;) {
      const settled = this.settledState();
      const got = this.read(this.block.subarray(0, want), HEADER_BYTES + y * this.rowBytes);
      if (got >= this.rowBytes) {
        this.first = y;
        this.count = Math.floor(got / this.rowBytes);
        return;
      }
      if (settled === WRITTEN) throw new SpoolReadError('wrong-file', `it ends before row ${y}`);
      this.wait();
    }
  }

  private open(): void {
    for (;;) {
      const settled = this.settledState();
      try {
        this.fd = openSync(this.path, 'r');
        break;
      } catch (e) {
        if ((e as NodeJS.ErrnoException).code !== 'ENOENT') throw new SpoolReadError('unreadable', messageOf(e));
        if (settled === WRITTEN) throw new SpoolReadError('wrong-file', 'it was never made');
      }
      this.wait();
    }
    const header = new Uint8Array(HEADER_BYTES);
    for (;;) {
      const settled = this.settledState();
      if (this.read(header, 0) === HEADER_BYTES) break;
      if (settled === WRITTEN) throw new SpoolReadError('wrong-file', 'it has no header');
      this.wait();
    }
    const wrong = headerMismatch(header, this.shape);
    if (wrong) throw new SpoolReadError('wrong-file', wrong);
  }

  /** Bytes read at `position` (whatever the file holds there now). */
  private read(into: Uint8Array, position: number): number {
    try {
      return readSync(this.fd, into, 0, into.length, position);
    } catch (e) {
      throw new SpoolReadError('unreadable', messageOf(e));
    }
  }

  /** The writer's state, read before a read so that WRITTEN means the read saw all there is. */
  private settledState(): number {
    const s = Atomics.load(this.state, 0);
    if (s === STOPPED) throw new SpoolReadError('stopped', 'the source stopped arriving');
    return s;
  }

  private wait(): void {
    const start = this.waited ? epochNow() : 0;
    Atomics.wait(this.state, 0, WRITING, 1);
    this.waited?.add(start, epochNow());
  }
}
