import { describe, expect, it } from 'vitest';
import { runCli } from './run-cli.js';

// Exit codes: 0 ok, 1 failure, 2 usage error (common practice for Unix command-line tools).
describe('foldwise (the command line)', () => {
  it('prints help listing its commands, exit 0', async () => {
    const r = await runCli(['--help']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^Usage: foldwise/);
    for (const name of ['serve', 'render', 'risk', 'warm', 'sign']) expect(r.stdout).toContain(`\n  ${name} `);
    expect(r.stdout).toContain('Exit codes: 0 done, 1 the work failed');
  });

  it('answers an unknown command and a bad argument with exit 2 and a clear message', async () => {
    const unknown = await runCli(['weave']);
    expect(unknown.code).toBe(2);
    expect(unknown.stderr).toContain("unknown command 'weave'");
    const bad = await runCli(['sign', 'no-slash']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toContain('give a full http(s) URL or a path starting with "/"');
  });

  // The one zod shape names the HTTP parameters; render and risk must offer each as a flag of
  // the same name (signature aside: the CLI calls the app in-process, unsigned).
  it('render and risk take exactly the HTTP rendition parameters as flags', async () => {
    const { createProgram } = await import('../../src/cli/program.js');
    const { renditionQueryShape } = await import('../../src/schemas/rendition.js');
    const { notFlags } = await import('../../src/cli/rendition-flags.js');
    const params = Object.keys(renditionQueryShape({ maxDimension: 100, kernelNames: [] })).filter((n) => !notFlags.includes(n));
    expect(notFlags).toEqual(['signature']);
    const own: Record<string, string[]> = { render: ['output'], risk: ['json', 'map'] };
    for (const name of ['render', 'risk']) {
      const command = createProgram().commands.find((c) => c.name() === name)!;
      const flags = command.options.map((o) => o.attributeName()).filter((n) => !own[name].includes(n));
      expect(new Set(flags), name).toEqual(new Set(params));
    }
    expect(params).toEqual(expect.arrayContaining(['light', 'position', 'density', 'background', 'format', 'quality']));
  });

  it('signs a full URL as copied from the browser, keeping its origin', async () => {
    const { verifySignature } = await import('../../src/security/signing.js');
    const key = 'loom-key-0123456789abcdef';
    const r = await runCli(['sign', 'http://127.0.0.1:8080/v1/renditions/fabric/twill.png?width=320'], { env: { FOLDWISE_SIGNING_KEY: key } });
    expect(r.code).toBe(0);
    const url = new URL(r.stdout.trim());
    expect(url.origin).toBe('http://127.0.0.1:8080');
    expect(url.searchParams.get('width')).toBe('320');
    expect(verifySignature(url.pathname, url.searchParams, [key])).toBe('valid');
    const help = await runCli(['sign', '--help']);
    expect(help.stdout).toContain('at least 16');
  });

  it('signs a path the way the service verifies it, and fails with exit 1 when signing is off', async () => {
    const { verifySignature } = await import('../../src/security/signing.js');
    const key = 'loom-key-0123456789abcdef';
    const r = await runCli(['sign', '/v1/renditions/fabric/herringbone.png?width=640&format=webp'], {
      env: { FOLDWISE_SIGNING_KEY: key },
    });
    expect(r.code).toBe(0);
    const url = new URL(r.stdout.trim(), 'http://localhost');
    expect(verifySignature(url.pathname, url.searchParams, [key])).toBe('valid');
    expect(verifySignature(url.pathname, url.searchParams, ['another-key-0123456789'])).toBe('invalid');
    const off = await runCli(['sign', '/v1/renditions/a.png?width=1'], { env: { FOLDWISE_SIGNING_KEY: '' } });
    expect(off.code).toBe(1);
    expect(off.stderr).toContain('signing is off');
  });

  it('signs an ingest URL bound to a file (its SHA-256) or to a named source', async () => {
    const { verifySignature } = await import('../../src/security/signing.js');
    const { createHash } = await import('node:crypto');
    const { mkdtemp, writeFile } = await import('node:fs/promises');
    const { tmpdir } = await import('node:os');
    const key = 'loom-key-0123456789abcdef';
    const file = `${await mkdtemp(`${tmpdir()}/foldwise-sign-`)}/swatch.bin`;
    const bytes = Buffer.from('any bytes stand in for an upload here');
    await writeFile(file, bytes);
    const env = { FOLDWISE_SIGNING_KEY: key };
    const upload = await runCli(['sign', '/v1/ingest?widths=320', '--upload', file], { env });
    expect(upload.code).toBe(0);
    const url = new URL(upload.stdout.trim(), 'http://localhost');
    // SHA-256 by node:crypto (FIPS 180-4), computed here rather than by the CLI's helper.
    expect(url.searchParams.get('digest')).toBe(createHash('sha256').update(bytes).digest('hex'));
    expect(verifySignature(url.pathname, url.searchParams, [key])).toBe('valid');
    const source = await runCli(['sign', '/v1/ingest', '--source', 'fabrics/twill.jpg'], { env });
    const named = new URL(source.stdout.trim(), 'http://localhost');
    expect(named.searchParams.get('source')).toBe('fabrics/twill.jpg');
    expect(verifySignature(named.pathname, named.searchParams, [key])).toBe('valid');
    const both = await runCli(['sign', '/v1/ingest', '--source', 'a.png', '--upload', file], { env });
    expect([both.code, both.stderr.includes('not both')]).toEqual([2, true]);
    const help = await runCli(['sign', '--help']);
    expect(help.stdout).toContain('--upload <file>');
  });
});
