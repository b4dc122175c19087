import { spawn } from 'node:child_process';
import { existsSync } from 'node:fs';
import { mkdtemp, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { logFormat, pageUrl } from '../src/logging.js';
import { binPath } from './cli/run-cli.js';
import { server as serverUnder } from './logging-terminal.js';

describe('the log format and the start line\u2019s URL', () => {
  it('is pretty on a terminal and JSON otherwise, unless set', () => {
    expect([logFormat('auto', true), logFormat('auto', false)]).toEqual(['pretty', 'json']);
    expect([logFormat('json', true), logFormat('pretty', false)]).toEqual(['json', 'pretty']);
  });

  it('points a browser at loopback when the server listens on every interface', () => {
    expect(pageUrl({ address: '127.0.0.1', family: 'IPv4', port: 8080 })).toBe('http://127.0.0.1:8080/');
    expect(pageUrl({ address: '0.0.0.0', family: 'IPv4', port: 80 })).toBe('http://127.0.0.1:80/');
    expect(pageUrl({ address: '::', family: 'IPv6', port: 8080 })).toBe('http://127.0.0.1:8080/');
    expect(pageUrl({ address: '::1', family: 'IPv6', port: 8080 })).toBe('http://[::1]:8080/');
  });
});

/** util-linux's script(1) runs a command on a pseudo-terminal: stdout is then a TTY. */
const scriptPath = '/usr/bin/script';
const noScript = existsSync(scriptPath) ? undefined : `${scriptPath} not found: the terminal log test is skipped`;
if (noScript) console.warn(noScript);

// Terminal colour codes (ECMA-48 SGR and cursor moves), removed before reading the lines.
/** The longest wait for one log line (a busy shared machine starts slowly). */
const waitMs = 45_000;

const ansi = /\u001b\[[0-9;]*[A-Za-z]/g;

describe('the server\u2019s log as a person and a machine see it', () => {
  let dir: string;
  let env: NodeJS.ProcessEnv;
  beforeAll(async () => {
    dir = await mkdtemp(join(tmpdir(), 'fw-logs-'));
    // Load shedding off: a busy machine's start-up stall must not turn the first request into a 503.
    const config = {
      origin: { generateDemo: false, sourceDir: dir },
      cache: { dir: join(dir, 'cache') },
      pool: { threads: 1 },
      pressure: { maxEventLoopDelayMs: 0, maxHeapUsedBytes: 0, maxRssBytes: 0 },
    };
    await writeFile(join(dir, 'config.json'), JSON.stringify(config));
    env = { ...process.env, FOLDWISE_CONFIG: join(dir, 'config.json'), FOLDWISE_LOG_FORMAT: undefined };
  });
  afterAll(() => rm(dir, { recursive: true, force: true }));

  /**
   * Starts `command`, waits for the start line, opens its URL and waits for that request's
   * completion line, then stops the server with SIGTERM (sent to the process `server` names:
   * under script(1) the server is script's child); returns the log without colour codes.
   * Each wait is bounded (waitMs) and fails with the log so far; a server still running when
   * the test ends, passed or failed, is killed. `lastLine` is the line awaited after SIGTERM (null: none; undefined would take the default).
   */
  async function startAndStop(
    command: string,
    args: string[],
    server: (pid: number) => number = (pid) => pid,
    lastLine: RegExp | null = /shutdown complete/,
  ) {
    const child = spawn(command, args, { env, stdio: ['ignore', 'pipe', 'pipe'] });
    const exited = new Promise<number | null>((resolve) => child.on('close', resolve));
    let log = '';
    const waiters: Array<() => boolean> = [];
    const seen = (pattern: RegExp) =>
      new Promise<RegExpExecArray>((resolve, reject) => {
        const look = () => {
          const m = pattern.exec(log.replace(ansi, ''));
          if (m) resolve(m);
          return m !== null;
        };
        if (!look()) waiters.push(look);
        child.on('close', () => reject(new Error(`server exited before ${pattern}: ${log}`)));
        setTimeout(() => reject(new Error(`no ${pattern} within ${waitMs} ms: ${log}`)), waitMs).unref();
      });
    child.stdout.setEncoding('utf8').on('data', (d: string) => {
      log += d;
      for (const w of [...waiters]) if (w()) waiters.splice(waiters.indexOf(w), 1);
    });
    let serverPid: number | undefined;
    try {
      const url = (await seen(/foldwise ready: open (http:\/\/127\.0\.0\.1:\d+\/) in a browser/))[1];
      serverPid = server(child.pid ?? 0);
      const page = await fetch(url, { headers: { accept: 'text/html' } });
      await page.text();
      // The request's last line (its status is checked by the caller, from the response).
      await seen(/request completed/);
      process.kill(serverPid, 'SIGTERM');
      if (lastLine) await seen(lastLine);
      expect(await exited).toBe(0);
      return { log: log.replace(ansi, ''), url, page };
    } finally {
      if (child.exitCode === null && child.signalCode === null) {
        if (serverPid) process.kill(serverPid, 'SIGKILL');
        child.kill('SIGKILL');
      }
    }
  }

  it('writes one JSON object per line when stdout is a pipe, the start line among them', async () => {
    const { log, url, page } = await startAndStop(process.execPath, [binPath, 'serve', '--port', '0', '--host', '127.0.0.1']);
    expect([page.status, page.headers.get('content-type')]).toEqual([200, 'text/html; charset=utf-8']);
    const lines = log.trim().split('\n');
    const parsed = lines.map((l) => JSON.parse(l) as { msg: string; url?: string });
    expect(parsed.find((l) => l.msg.startsWith('foldwise ready'))).toMatchObject({ url, msg: `foldwise ready: open ${url} in a browser` });
  }, 4 * waitMs);

  it.skipIf(noScript)('writes readable lines through pino-pretty on a terminal', async () => {
    // script(1) runs the command through $SHELL -c; `exec` makes the shell become the server,
    // but a shell may still stand between them, so the server is looked up by its command line.
    const serve = `exec ${[process.execPath, binPath, 'serve', '--port', '0', '--host', '127.0.0.1'].map((a) => `'${a}'`).join(' ')}`;
    const childOf = (pid: number) => serverUnder(pid, binPath);
    // script(1) may stop copying the terminal's output once its child has exited, so the last
    // line is not awaited here; -e passes on the server's exit code (0: a clean shutdown).
    const { log, url, page } = await startAndStop(scriptPath, ['-qfec', serve, '/dev/null'], childOf, null);
    expect(page.status).toBe(200);
    // "[20:34:52.281] INFO: foldwise ready: open http://127.0.0.1:PORT/ in a browser {"url":...}"
    const start = log.split(/\r?\n/).find((l) => l.includes('foldwise ready')) ?? '';
    expect(start).toMatch(new RegExp(`^\\[\\d\\d:\\d\\d:\\d\\d\\.\\d{3}\\] INFO: foldwise ready: open ${url.replace(/[.]/g, '\\.')} in a browser \\{`));
    expect(log).toMatch(/^\[\d\d:\d\d:\d\d\.\d{3}\] INFO: request completed \{.*"statusCode":200/m);
    expect(log).not.toMatch(/^\{"level"/m);
  }, 4 * waitMs);
});
