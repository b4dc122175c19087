/**
 * A binary-safe byte form for any JSON-like value that may hold typed arrays and Buffers
 * (a cached rendition, a SourceSpectrum analysis), so every cache tier (memory, disk,
 * Redis) can store it as plain bytes.
 *
 * Layout: "FWP" | byte-order flag ('L' or 'B') | uint32 LE JSON length | JSON (UTF-8)
 * | binary segments, each starting on an 8-byte boundary so any element type lines up.
 * In the JSON a typed array becomes {"$fwbin": [kind, offset, byteLength]} and a
 * non-finite number becomes {"$fwnum": "NaN" | "Infinity" | "-Infinity"}.
 */

const MAGIC = 'FWP';
const NATIVE_ORDER = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 'L' : 'B';
const HEAD = 8;
const BIN = '$fwbin';
const NUM = '$fwnum';

type ArrayKind =
  | 'Buffer' | 'Uint8Array' | 'Uint8ClampedArray' | 'Int8Array' | 'Uint16Array'
  | 'Int16Array' | 'Uint32Array' | 'Int32Array' | 'Float32Array' | 'Float64Array';

const makers: Record<ArrayKind, (b: ArrayBuffer, o: number, n: number) => ArrayBufferView> = {
  Buffer: (b, o, n) => Buffer.from(b, o, n),
  Uint8Array: (b, o, n) => new Uint8Array(b, o, n),
  Uint8ClampedArray: (b, o, n) => new Uint8ClampedArray(b, o, n),
  Int8Array: (b, o, n) => new Int8Array(b, o, n),
  Uint16Array: (b, o, n) => new Uint16Array(b, o, n / 2),
  Int16Array: (b, o, n) => new Int16Array(b, o, n / 2),
  Uint32Array: (b, o, n) => new Uint32Array(b, o, n / 4),
  Int32Array: (b, o, n) => new Int32Array(b, o, n / 4),
  Float32Array: (b, o, n) => new Float32Array(b, o, n / 4),
  Float64Array: (b, o, n) => new Float64Array(b, o, n / 8),
};

function kindOf(v: ArrayBufferView): ArrayKind {
  if (Buffer.isBuffer(v)) return 'Buffer';
  const name = v.constructor.name as ArrayKind;
  if (name in makers) return name;
  throw new TypeError(`pack: unsupported binary type ${v.constructor.name}`);
}

const pad8 = (n: number): number => (n + 7) & ~7;

/** Turns a value (JSON-like, with typed arrays and Buffers anywhere) into bytes. */
export function packValue(value: unknown): Buffer {
  const segments: ArrayBufferView[] = [];
  let offset = 0;
  const json = JSON.stringify(value, function (this: unknown, key, after: unknown) {
    // Read the holder: Buffer.toJSON has already run on `after`, the raw value is intact.
    const v = (this as Record<string, unknown>)[key];
    if (typeof v === 'number' && !Number.isFinite(v)) return { [NUM]: String(v) };
    if (v !== null && typeof v === 'object') {
      if (ArrayBuffer.isView(v) && !(v instanceof DataView)) {
        const marker = { [BIN]: [kindOf(v), offset, v.byteLength] };
        segments.push(v);
        offset = pad8(offset + v.byteLength);
        return marker;
      }
      if (BIN in v || NUM in v) throw new TypeError(`pack: reserved key in value`);
    }
    return after;
  });
  if (json === undefined) throw new TypeError('pack: value has no JSON form');
  const text = Buffer.from(json, 'utf8');
  const binStart = pad8(HEAD + text.length);
  const out = Buffer.alloc(binStart + offset);
  out.write(MAGIC + NATIVE_ORDER, 0, 'latin1');
  out.writeUInt32LE(text.length, 4);
  text.copy(out, HEAD);
  let at = binStart;
  for (const s of segments) {
    out.set(new Uint8Array(s.buffer, s.byteOffset, s.byteLength), at);
    at = pad8(at + s.byteLength);
  }
  return out;
}

/** Reverses packValue. Throws on bytes it did not write (callers treat that as a miss). */
export function unpackValue<T = unknown>(bytes: Buffer): T {
  if (bytes.length < HEAD || bytes.toString('latin1', 0, 3) !== MAGIC) {
    throw new TypeError('unpack: not a packed value');
  }
  if (bytes.toString('latin1', 3, 4) !== NATIVE_ORDER) {
    throw new TypeError('unpack: packed on a machine of the other byte order');
  }
  const length = bytes.readUInt32LE(4);
  if (HEAD + length > bytes.length) throw new TypeError('unpack: truncated');
  const binStart = pad8(HEAD + length);
  // One aligned copy of the binary part: views need element-aligned offsets.
  const bin = new Uint8Array(Math.max(0, bytes.length - binStart));
  bin.set(bytes.subarray(binStart));
  const text = bytes.toString('utf8', HEAD, HEAD + length);
  return JSON.parse(text, (_key, v: unknown) => {
    if (v === null || typeof v !== 'object') return v;
    const o = v as Record<string, unknown>;
    if (NUM in o) return Number(o[NUM]);
    if (!(BIN in o)) return v;
    const [kind, off, n] = o[BIN] as [ArrayKind, number, number];
    if (!(kind in makers) || !(off >= 0) || !(n >= 0) || off + n > bin.length) {
      throw new TypeError('unpack: bad binary segment');
    }
    return makers[kind](bin.buffer, off, n);
  }) as T;
}
