import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ConfigError, loadConfig } from '../src/config.js';

describe('configuration: default.json, then FOLDWISE_CONFIG, then the environment', () => {
  let dir: string;
  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'fw-config-'));
  });
  afterAll(() => rm(dir, { recursive: true, force: true }));

  it('defaults: 127.0.0.1:8080, ./demo/images', () => {
    const c = loadConfig({});
    expect([c.server.host, c.server.port, c.origin.sourceDir]).toEqual(['127.0.0.1', 8080, './demo/images']);
    expect(c.signing.keys).toEqual([]);
  });

  it('a FOLDWISE_CONFIG file overrides the defaults key by key, and the environment overrides both', async () => {
    const file = join(dir, 'over.json');
    await writeFile(file, JSON.stringify({ server: { port: 9000 }, limits: { maxDimension: 4096 } }));
    const c = loadConfig({ FOLDWISE_CONFIG: file, HOST: '0.0.0.0', FOLDWISE_SOURCE_DIR: '/srv/pics', FOLDWISE_CACHE_DIR: '/var/fw' });
    expect(c.server.port).toBe(9000);
    expect(c.server.host).toBe('0.0.0.0');
    expect(c.limits.maxDimension).toBe(4096);
    expect(c.limits.maxPixels).toBe(100_000_000); // untouched defaults stay
    expect(c.origin.sourceDir).toBe('/srv/pics');
    expect(c.cache.dir).toBe('/var/fw');
    expect(loadConfig({ FOLDWISE_CONFIG: file, PORT: '8181' }).server.port).toBe(8181);
  });

  it('FOLDWISE_SIGNING_KEY takes a comma list (rotation)', () => {
    const c = loadConfig({ FOLDWISE_SIGNING_KEY: 'first-key-0123456789, second-key-0123456789' });
    expect(c.signing.keys).toEqual(['first-key-0123456789', 'second-key-0123456789']);
  });

  it.each([
    [{ PORT: 'eighty' }, /server\.port \(from PORT\)/],
    [{ PORT: '70000' }, /server\.port \(from PORT\)/],
    [{ FOLDWISE_REDIS_URL: 'not a url' }, /cache\.redisUrl \(from FOLDWISE_REDIS_URL\)/],
    [{ FOLDWISE_SIGNING_KEY: 'short' }, /signing\.keys\.0 \(from FOLDWISE_SIGNING_KEY\)/],
  ])('a bad value stops the start with a message naming it: %o', (env, message) => {
    expect(() => loadConfig(env as NodeJS.ProcessEnv)).toThrow(ConfigError);
    expect(() => loadConfig(env as NodeJS.ProcessEnv)).toThrow(message);
  });

  it('names bad and unknown keys from the file', async () => {
    const file = join(dir, 'bad.json');
    await writeFile(file, JSON.stringify({ limits: { maxDimension: -1 }, cache: { memoryByte: 5 } }));
    expect(() => loadConfig({ FOLDWISE_CONFIG: file })).toThrow(/limits\.maxDimension/);
    expect(() => loadConfig({ FOLDWISE_CONFIG: file })).toThrow(/memoryByte/);
  });

  it('an unreadable FOLDWISE_CONFIG is named', () => {
    expect(() => loadConfig({ FOLDWISE_CONFIG: join(dir, 'missing.json') })).toThrow(/FOLDWISE_CONFIG .*missing\.json/);
  });
});
