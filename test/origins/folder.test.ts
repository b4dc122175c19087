import { mkdtemp, mkdir, open, rm, symlink, truncate, writeFile, utimes } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createFolderOrigin, readWhole } from '../../src/origins/folder.js';

// Path-traversal refusals follow the OWASP "Path Traversal" attack catalogue (dot-dot
// segments, percent-encoded dots and slashes, backslashes, NUL, absolute paths, links out).
let base: string;
let root: string;

beforeAll(async () => {
  base = await mkdtemp(join(tmpdir(), 'foldwise-folder-'));
  root = join(base, 'root');
  await mkdir(join(root, 'fabrics', 'deep'), { recursive: true });
  await writeFile(join(root, 'fabrics', 'plain.png'), Buffer.from('png bytes'));
  await writeFile(join(root, 'fabrics', 'deep', 'twill.JPG'), Buffer.from('jpeg bytes!'));
  await writeFile(join(root, 'notes.txt'), 'not an image');
  await writeFile(join(root, '.hidden.png'), 'hidden');
  await writeFile(join(base, 'secret.png'), 'outside the root');
  await symlink(join(base, 'secret.png'), join(root, 'escape.png'));
  await symlink(join(root, 'fabrics', 'plain.png'), join(root, 'inside-link.png'));
  await symlink(base, join(root, 'outdir'));
});
afterAll(async () => {
  await rm(base, { recursive: true, force: true });
});

describe('folder origin', () => {
  it('reads a file under the root with a size+mtime identity', async () => {
    const origin = createFolderOrigin(root);
    const got = await origin.read('fabrics/plain.png');
    expect(got.bytes.toString()).toBe('png bytes');
    expect(got.identity.key).toBe('fabrics/plain.png');
    const id = await origin.identify('fabrics/plain.png');
    expect(id).toEqual(got.identity);
  });

  it('changes the version when the file changes', async () => {
    const origin = createFolderOrigin(root);
    const before = await origin.identify('fabrics/plain.png');
    await utimes(join(root, 'fabrics', 'plain.png'), new Date(2001, 1, 1), new Date(2001, 1, 1));
    const after = await origin.identify('fabrics/plain.png');
    expect(after.version).not.toBe(before.version);
  });

  it('follows a symlink that stays inside the root', async () => {
    const origin = createFolderOrigin(root);
    expect((await origin.read('inside-link.png')).bytes.toString()).toBe('png bytes');
  });

  it.each([
    ['../secret.png', 'dot-dot'],
    ['fabrics/../../secret.png', 'dot-dot inside'],
    ['%2e%2e/secret.png', 'encoded dots'],
    ['%2E%2E%2Fsecret.png', 'encoded dots and slash'],
    ['fabrics%2fplain.png', 'encoded slash'],
    ['..\\secret.png', 'backslash'],
    ['fabrics/plain.png\u0000.png', 'NUL'],
    ['/etc/passwd.png', 'absolute'],
    [join(tmpdir(), 'secret.png'), 'absolute into the temp dir'],
    ['C:/secret.png', 'drive letter'],
    ['escape.png', 'symlink out of the root'],
    ['outdir/secret.png', 'symlinked directory out of the root'],
    ['fabrics//plain.png', 'empty segment'],
    ['./fabrics/plain.png', 'dot segment'],
    ['.hidden.png', 'hidden file'],
  ])('refuses %s (%s)', async (path) => {
    const origin = createFolderOrigin(root);
    await expect(origin.read(path)).rejects.toMatchObject({ code: 'ERR_SOURCE_PATH_INVALID', status: 400 });
    await expect(origin.identify(path)).rejects.toMatchObject({ code: 'ERR_SOURCE_PATH_INVALID' });
  });

  it('answers ERR_SOURCE_NOT_FOUND for a missing file or a folder', async () => {
    const origin = createFolderOrigin(root);
    await expect(origin.read('fabrics/missing.png')).rejects.toMatchObject({ code: 'ERR_SOURCE_NOT_FOUND', status: 404 });
    await expect(origin.identify('nowhere/missing.jpg')).rejects.toMatchObject({ code: 'ERR_SOURCE_NOT_FOUND' });
  });

  it('refuses non-image names and files over the byte limit', async () => {
    await expect(createFolderOrigin(root).read('notes.txt')).rejects.toMatchObject({ code: 'ERR_SOURCE_UNSUPPORTED' });
    const small = createFolderOrigin(root, { maxBytes: 5 });
    await expect(small.read('fabrics/plain.png')).rejects.toMatchObject({ code: 'ERR_SOURCE_TOO_LARGE', status: 413 });
  });

  it('lists image files recursively, sorted, without hidden files or links', async () => {
    const listing = await createFolderOrigin(root).list!();
    expect(listing.map((l) => l.path)).toEqual(['fabrics/deep/twill.JPG', 'fabrics/plain.png']);
    expect(listing[0].bytes).toBe(11);
    expect(Number.isNaN(Date.parse(listing[0].modified))).toBe(false);
  });

  it('lists nothing and reads nothing when the root is missing', async () => {
    const origin = createFolderOrigin(join(base, 'absent'));
    expect(await origin.list!()).toEqual([]);
    await expect(origin.read('a.png')).rejects.toMatchObject({ code: 'ERR_SOURCE_NOT_FOUND' });
  });

  it('stops before reading when the signal is already aborted', async () => {
    const ac = new AbortController();
    ac.abort();
    await expect(createFolderOrigin(root).read('fabrics/plain.png', ac.signal)).rejects.toThrow();
  });
});

describe('reading a source whole (readWhole)', () => {
  // A woven-looking byte pattern of the size of a small photo, not a multiple of the call size.
  const pattern = Buffer.from(Array.from({ length: 100_003 }, (_, i) => (i * 31 + (i >> 7)) & 0xff));

  it('reads every byte in calls of the given size, and fewer when the file ended sooner', async () => {
    const file = join(base, 'whole.jpg');
    await writeFile(file, pattern);
    const handle = await open(file, 'r');
    try {
      expect((await readWhole(handle, pattern.length, undefined, 4096)).equals(pattern)).toBe(true);
      // The file shrank since its stat: what is there, no zero tail.
      await truncate(file, 70_000);
      const short = await readWhole(handle, pattern.length, undefined, 4096);
      expect(short.length).toBe(70_000);
      expect(short.equals(pattern.subarray(0, 70_000))).toBe(true);
    } finally {
      await handle.close();
    }
  });

  it('stops between calls once the signal is aborted', async () => {
    const file = join(base, 'whole-abort.jpg');
    await writeFile(file, pattern);
    const handle = await open(file, 'r');
    try {
      const ask = new AbortController();
      ask.abort(new Error('the visitor left'));
      await expect(readWhole(handle, pattern.length, ask.signal, 4096)).rejects.toThrow('the visitor left');
    } finally {
      await handle.close();
    }
  });

  it('closes each file it read, without the read waiting for the close', async () => {
    const own = join(base, 'closes');
    await mkdir(own);
    await writeFile(join(own, 'whole.jpg'), pattern);
    const origin = createFolderOrigin(own);
    // A handle left open is closed by the garbage collector, which Node reports as a warning.
    const warned: string[] = [];
    const onWarning = (w: Error) => warned.push(w.message);
    process.on('warning', onWarning);
    try {
      for (let i = 0; i < 100; i++) expect((await origin.read('whole.jpg')).bytes.equals(pattern)).toBe(true);
      // Garbage enough for a few young-generation collections, then time for their warnings.
      let sum = 0;
      for (let i = 0; i < 200; i++) sum += new Array(10_000).fill(i).length;
      expect(sum).toBe(2_000_000);
      await new Promise((r) => setTimeout(r, 50));
    } finally {
      process.off('warning', onWarning);
    }
    expect(warned.filter((m) => /file descriptor/i.test(m))).toEqual([]);
  });
});
