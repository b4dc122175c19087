/**
 * How the server process logs, and the line that tells a person where to look. JSON lines
 * are the default (log shippers read them); on a terminal, pino's own pretty printer
 * (pino-pretty, in pino's transport thread) writes one readable line per event.
 */
import type { AddressInfo } from 'node:net';
import type { FastifyServerOptions } from 'fastify';
import type { Config } from './config.js';

/** The format in force: `auto` means pretty when stdout is a terminal, JSON otherwise. */
export function logFormat(setting: Config['server']['logFormat'], stdoutIsTty: boolean): 'json' | 'pretty' {
  if (setting !== 'auto') return setting;
  return stdoutIsTty ? 'pretty' : 'json';
}

/** Fastify's logger options for the server process. */
export function serverLogger(config: Config, stdoutIsTty: boolean): FastifyServerOptions['logger'] {
  const level = config.server.logLevel;
  if (logFormat(config.server.logFormat, stdoutIsTty) === 'json') return { level };
  return {
    level,
    transport: {
      target: 'pino-pretty',
      // sync: the transport thread writes each line as it reads it, so nothing waits in its
      // buffer when the process ends.
      options: { sync: true, colorize: stdoutIsTty, singleLine: true, translateTime: 'SYS:HH:MM:ss.l', ignore: 'pid,hostname' },
    },
  };
}

/**
 * The URL to open in a browser on this machine: the listening address, with a wildcard
 * address (0.0.0.0, ::) replaced by loopback, and an IPv6 address in brackets.
 */
export function pageUrl(address: AddressInfo): string {
  const wildcard = address.address === '0.0.0.0' || address.address === '::';
  const host = wildcard ? '127.0.0.1' : address.family === 'IPv6' ? `[${address.address}]` : address.address;
  return `http://${host}:${address.port}/`;
}
