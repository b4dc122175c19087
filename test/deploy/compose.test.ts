/**
 * compose.yaml and deploy/haproxy.cfg checked without Docker (none on the test machines):
 * every variable the replicas get is one the service reads, the environment compose makes
 * loads as a valid configuration, HAProxy's servers are exactly the replica services on the
 * port the image listens on, its check path is a route the service answers, and Debian's
 * HAProxy accepts the file (`haproxy -c`).
 */
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { parse } from 'yaml';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { envMap, loadConfig } from '../../src/config.js';
import { build, type TestApp } from '../helpers/build.js';
import { haproxyBinary } from '../scaleout/cluster.js';

const file = (name: string) => fileURLToPath(new URL(`../../${name}`, import.meta.url));
const compose = parse(readFileSync(file('compose.yaml'), 'utf8')) as { services: Record<string, any> };
const haproxyCfg = readFileSync(file('deploy/haproxy.cfg'), 'utf8');
const dockerfile = readFileSync(file('Dockerfile'), 'utf8');

/** The replicas: the services built from this repository. */
const replicas = Object.entries(compose.services).filter(([, s]) => s.build === '.');

/** The runtime stage's ENV (the last stage's `ENV k=v \` lines). */
function imageEnv(): Record<string, string> {
  const runtime = dockerfile.slice(dockerfile.lastIndexOf('\nFROM '));
  const block = /\nENV ((?:[^\n]*\\\n)*[^\n]*)/.exec(runtime)?.[1] ?? '';
  return Object.fromEntries([...block.matchAll(/([A-Z_]+)=(\S+)/g)].map((m) => [m[1], m[2]]));
}

/** Compose's interpolation of ${NAME}, ${NAME:-default} and ${NAME:?message} from `shell`. */
function interpolate(value: string, shell: Record<string, string>): string {
  return value.replace(/\$\{([A-Z0-9_]+)(?::([-?])([^}]*))?\}/g, (_all, name: string, op?: string, arg?: string) => {
    const set = shell[name];
    if (set !== undefined && set !== '') return set;
    if (op === '?') throw new Error(`${name}: ${arg}`);
    return op === '-' ? (arg ?? '') : '';
  });
}

describe('compose.yaml and deploy/haproxy.cfg', () => {
  it('has two replicas, Redis and the balancer', () => {
    expect(replicas.map(([name]) => name)).toEqual(['replica-1', 'replica-2']);
    expect(Object.keys(compose.services).sort()).toEqual(['balancer', 'redis', 'replica-1', 'replica-2']);
  });

  it('sets only variables the service (config.ts) or the AWS SDK reads, and they load as a valid configuration', () => {
    // The SDK's standard credential and region variables (AWS SDK for JavaScript v3 docs).
    const sdk = ['AWS_ACCESS_KEY_ID', 'AWS_SECRET_ACCESS_KEY', 'AWS_REGION'];
    const known = new Set([...Object.keys(envMap), 'FOLDWISE_CONFIG', ...sdk]);
    for (const [, service] of replicas) {
      const names = Object.keys(service.environment);
      expect(names.filter((n) => !known.has(n))).toEqual([]);
      expect(names.filter((n) => n.startsWith('FOLDWISE_')).length).toBeGreaterThanOrEqual(6);
      // Without the store URL compose refuses to start (${...:?}); with it the config is valid.
      expect(() => interpolate(service.environment.FOLDWISE_STORE_URL, {})).toThrow(/FOLDWISE_STORE_URL/);
      const shell = { FOLDWISE_STORE_URL: 's3://shop/pictures', FOLDWISE_SIGNING_KEY: 'a key for the weaving shop' };
      const env: Record<string, string> = { ...imageEnv() };
      for (const [name, value] of Object.entries(service.environment)) env[name] = interpolate(String(value), shell);
      const config = loadConfig(env);
      expect(config.cache.redisUrl).toBe('redis://redis:6379');
      expect(config.origin.storeUrl).toBe('s3://shop/pictures');
      expect(config.server).toMatchObject({ host: '0.0.0.0', port: 8080, publicUrl: 'http://127.0.0.1:8080' });
    }
  });

  it('points the replicas at the redis service, which keeps an append-only file (jobs survive its restart)', () => {
    const redisUrl = new URL(replicas[0][1].environment.FOLDWISE_REDIS_URL);
    expect(redisUrl.hostname).toBe('redis');
    expect(Object.keys(compose.services)).toContain(redisUrl.hostname);
    expect(redisUrl.port).toBe('6379'); // Redis's default port (redis.io documentation)
    const command: string[] = compose.services.redis.command;
    expect(command[command.indexOf('--appendonly') + 1]).toBe('yes');
    for (const [, s] of replicas) expect(s.depends_on).toContain('redis');
  });

  it('balances over exactly the replica services, on the port the image listens on', () => {
    const servers = [...haproxyCfg.matchAll(/^\s*server\s+\S+\s+([^:\s]+):(\d+)/gm)].map((m) => ({ host: m[1], port: m[2] }));
    expect(servers.map((s) => s.host).sort()).toEqual(replicas.map(([name]) => name).sort());
    for (const s of servers) expect(s.port).toBe(imageEnv().PORT);
    const bind = /^\s*bind\s+\S*:(\d+)/m.exec(haproxyCfg)?.[1];
    const balancer = compose.services.balancer;
    // "host-ip:host-port:container-port": the container side is HAProxy's bind port.
    expect(balancer.ports.map((p: string) => p.split(':').at(-1))).toEqual([bind]);
    expect(balancer.depends_on.sort()).toEqual(replicas.map(([name]) => name).sort());
    // The official haproxy image reads /usr/local/etc/haproxy/haproxy.cfg (its documentation).
    expect(balancer.volumes).toEqual(['./deploy/haproxy.cfg:/usr/local/etc/haproxy/haproxy.cfg:ro']);
  });

  it.skipIf(!haproxyBinary)('is a configuration HAProxy accepts (haproxy -c); only the compose names do not resolve here', () => {
    const run = spawnSync(haproxyBinary!, ['-c', '-f', file('deploy/haproxy.cfg')], { encoding: 'utf8', timeout: 20_000 });
    const out = `${run.stdout}${run.stderr}`;
    expect(run.status).toBe(0);
    expect(out).toMatch(/Configuration file is valid/);
    const warnings = out.split('\n').filter((l) => /\[(WARNING|ALERT)\]/.test(l));
    for (const w of warnings) expect(w).toMatch(/could not resolve address 'replica-\d'/);
  });

  describe('the health check path', () => {
    let t: TestApp;
    beforeAll(async () => {
      t = await build();
    });
    afterAll(() => t?.close());

    it('is /readyz, which the service answers 200 when ready', async () => {
      const path = /^\s*option\s+httpchk\s+GET\s+(\S+)/m.exec(haproxyCfg)?.[1];
      expect(path).toBe('/readyz');
      const res = await t.app.inject(path!);
      expect(res.statusCode).toBe(200);
      expect(res.json().status).toBe('ready');
    });
  });
});
