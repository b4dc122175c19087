/**
 * The rendition parameters as command-line flags, shared by `render` and `risk`: the same
 * names as the HTTP query, validated by the same zod schema (a bad value is a usage error).
 */
import type { Command } from 'commander';
import type { Config } from '../config.js';
import type { RenditionQuery } from '../schemas/rendition.js';
import { UsageError } from './exit.js';
import { positiveInt } from './options.js';

export interface RenditionFlags {
  width?: number;
  height?: number;
  fit?: string;
  kernel?: string;
  prefilter?: string;
}

/** Adds --width, --height, --fit, --kernel and --prefilter to a command. */
export function addRenditionFlags(command: Command): Command {
  return command
    .option('--width <px>', 'target width', positiveInt())
    .option('--height <px>', 'target height', positiveInt())
    .option('--fit <mode>', 'CSS object-fit when both sides are given: contain, cover, fill, scale-down')
    .option('--kernel <name>', 'reconstruction kernel (default auto)')
    .option('--prefilter <auto|none|sigma>', 'Gaussian prefilter (default auto)');
}

/** The flags as a raw HTTP-style query (plus `extra`); at least one side is required. */
export function rawQueryOf(o: RenditionFlags, extra: Record<string, string | number | undefined> = {}): Record<string, string> {
  if (o.width === undefined && o.height === undefined) throw new UsageError('give --width, --height, or both');
  const raw: Record<string, string> = {};
  for (const [key, value] of Object.entries({ ...extra, width: o.width, height: o.height, fit: o.fit, kernel: o.kernel, prefilter: o.prefilter })) {
    if (value !== undefined) raw[key] = String(value);
  }
  return raw;
}

/** Validates the raw query with the service's own schema; a refusal becomes a usage error. */
export async function parseRenditionQuery(config: Config, raw: Record<string, string>): Promise<RenditionQuery> {
  const { compileRenditionQuery } = await import('../schemas/rendition.js');
  const { kernelNames } = await import('../core/index.js');
  const { asUsage } = await import('./app.js');
  try {
    return compileRenditionQuery({ maxDimension: config.limits.maxDimension, kernelNames }).parse(raw);
  } catch (e) {
    throw asUsage(e);
  }
}

/**
 * App settings for a command on one file: its folder is the origin; no cache at all; no
 * signing (the command calls the app in-process, on behalf of whoever may read the file).
 */
export function oneFileSettings(folder: string): (config: Config) => void {
  return (config) => {
    config.origin.sourceDir = folder;
    config.cache = { ...config.cache, memoryBytes: 0, diskBytes: 0, redisUrl: null };
    config.signing = { ...config.signing, keys: [], required: false };
  };
}
