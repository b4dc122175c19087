/**
 * The rendition parameters as command-line flags, shared by `render` and `risk`: one flag per
 * parameter of the HTTP query, with the same name, derived from the one zod shape
 * (renditionQueryShape) and validated by the same schema (a bad value is a usage error).
 */
import type { Command } from 'commander';
import type { Config } from '../config.js';
import { kernelNames } from '../core/kernels/index.js';
import { renditionQueryShape, type RenditionQuery } from '../schemas/rendition.js';
import { UsageError } from './exit.js';

/** HTTP parameters that are not flags: the CLI calls the app in-process, unsigned. */
export const notFlags: readonly string[] = ['signature'];

type Field = { meta(): { description?: string } | undefined; def: { innerType?: Field; defaultValue?: unknown }; options?: unknown };

/** The enum values of a field, through its optional/default wrappers, or undefined. */
function choicesOf(field: Field): readonly string[] | undefined {
  for (let f: Field | undefined = field; f; f = f.def.innerType) if (Array.isArray(f.options)) return f.options as string[];
  return undefined;
}

/** One flag per rendition parameter: name, help text (description, values, default). */
export function renditionFlagSpecs(): { name: string; help: string }[] {
  const shape = renditionQueryShape({ maxDimension: 65535, kernelNames }) as unknown as Record<string, Field>;
  return Object.entries(shape)
    .filter(([name]) => !notFlags.includes(name))
    .map(([name, field]) => {
      const choices = choicesOf(field);
      const dflt = field.def.defaultValue;
      const words = [field.meta()?.description ?? name];
      if (choices) words.push(`One of: ${choices.join(', ')}.`);
      if (dflt !== undefined && typeof dflt !== 'object') words.push(`Default ${String(dflt)}.`);
      return { name, help: words.join(' ') };
    });
}

/** The flag values, by parameter name (all strings: the schema parses them as HTTP would). */
export type RenditionFlags = Record<string, string | undefined>;

/** Adds one `--<name> <value>` per rendition parameter to a command. */
export function addRenditionFlags(command: Command, except: readonly string[] = []): Command {
  for (const { name, help } of renditionFlagSpecs()) if (!except.includes(name)) command.option(`--${name} <value>`, help);
  return command;
}

/** The flags as a raw HTTP-style query (plus `extra`); at least one side is required. */
export function rawQueryOf(o: RenditionFlags, extra: Record<string, string | number | undefined> = {}): Record<string, string> {
  if (o.width === undefined && o.height === undefined) throw new UsageError('give --width, --height, or both');
  const raw: Record<string, string> = {};
  const flags = Object.fromEntries(renditionFlagSpecs().map(({ name }) => [name, o[name]]));
  for (const [key, value] of Object.entries({ ...flags, ...extra })) {
    if (value !== undefined) raw[key] = String(value);
  }
  return raw;
}

/** Validates the raw query with the service's own schema; a refusal becomes a usage error. */
export async function parseRenditionQuery(config: Config, raw: Record<string, string>): Promise<RenditionQuery> {
  const { compileRenditionQuery } = await import('../schemas/rendition.js');
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
