import { mkdtemp, readFile, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { digestOf, keyFor, storeOnce } from '../../src/ingest/store.js';

const dirs: string[] = [];
afterEach(async () => {
  await Promise.all(dirs.splice(0).map((d) => rm(d, { recursive: true, force: true })));
});

describe('content-addressed store', () => {
  it('keys by SHA-256', () => {
    // FIPS 180-4 test vector (also in RFC 6234): SHA-256("abc").
    const abc = 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad';
    expect(digestOf(new TextEncoder().encode('abc'))).toBe(abc);
    expect(keyFor(abc, 'png', { prefix: '/uploads/', digestChars: 16 })).toBe('uploads/ba7816bf8f01cfea.png');
    expect(keyFor(abc, 'jpg', { prefix: '', digestChars: 64 })).toBe(`${abc}.jpg`);
    expect(() => keyFor('xyz', 'png', { prefix: 'u', digestChars: 16 })).toThrow(RangeError);
    expect(() => keyFor(abc, '../x', { prefix: 'u', digestChars: 16 })).toThrow(RangeError);
  });

  it('writes once and leaves no partial files', async () => {
    const root = await mkdtemp(path.join(tmpdir(), 'fw-store-'));
    dirs.push(root);
    const bytes = new Uint8Array([1, 2, 3, 4]);
    expect(await storeOnce(root, 'uploads/a.png', bytes)).toBe(true);
    expect(await storeOnce(root, 'uploads/a.png', bytes)).toBe(false);
    expect([...(await readFile(path.join(root, 'uploads/a.png')))]).toEqual([1, 2, 3, 4]);
    expect(await readdir(path.join(root, 'uploads'))).toEqual(['a.png']);
    await expect(storeOnce(root, '../escape.png', bytes)).rejects.toThrow(RangeError);
  });
});
