import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { type Config, configSchema } from './config/schema.js';
import { envMap } from './config/env.js';

export { type Config, configSchema, type Limits } from './config/schema.js';
export { envMap } from './config/env.js';

type Json = Record<string, unknown>;

/** Thrown when the configuration is invalid; the message names every bad setting. */
export class ConfigError extends Error {
  override name = 'ConfigError';
}

function isObject(v: unknown): v is Json {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/** Objects merge key by key; arrays and scalars replace. */
export function deepMerge(base: Json, over: Json): Json {
  const out: Json = { ...base };
  for (const [k, v] of Object.entries(over)) {
    out[k] = isObject(v) && isObject(out[k]) ? deepMerge(out[k] as Json, v) : v;
  }
  return out;
}

function setPath(target: Json, path: string[], value: unknown): void {
  let node = target;
  for (const key of path.slice(0, -1)) {
    if (!isObject(node[key])) node[key] = {};
    node = node[key] as Json;
  }
  node[path[path.length - 1]] = value;
}

function readJson(file: string, label: string): Json {
  let parsed: unknown;
  try {
    parsed = JSON.parse(readFileSync(file, 'utf8'));
  } catch (e) {
    throw new ConfigError(`${label} (${file}) cannot be read as JSON: ${(e as Error).message}`);
  }
  if (!isObject(parsed)) throw new ConfigError(`${label} (${file}) must hold a JSON object`);
  return parsed;
}

/** Validates a merged configuration object; errors name each setting and, if set, its env var. */
export function validateConfig(raw: unknown, fromEnv: Record<string, string> = {}): Config {
  const result = configSchema.safeParse(raw);
  if (result.success) return result.data;
  const lines = result.error.issues.map((issue) => {
    const at = issue.path.join('.') || '(root)';
    // An issue deep inside an env-set value (e.g. signing.keys.0) still names the variable.
    const source = Object.keys(fromEnv).find((p) => at === p || at.startsWith(`${p}.`));
    const env = source ? ` (from ${fromEnv[source]})` : '';
    const keys = issue.code === 'unrecognized_keys' ? `: ${issue.keys.join(', ')}` : '';
    return `  ${at}${env}: ${issue.message}${keys}`;
  });
  throw new ConfigError(`invalid configuration:\n${lines.join('\n')}`);
}

export const defaultConfigFile = fileURLToPath(new URL('../config/default.json', import.meta.url));

/**
 * Loads config/default.json, then the file named by FOLDWISE_CONFIG, then the environment
 * variables, and validates the result. Throws ConfigError naming every bad value.
 */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  let merged = readJson(defaultConfigFile, 'config/default.json');
  if (env.FOLDWISE_CONFIG) {
    merged = deepMerge(merged, readJson(env.FOLDWISE_CONFIG, 'FOLDWISE_CONFIG'));
  }
  const fromEnv: Record<string, string> = {};
  for (const [name, { path, parse }] of Object.entries(envMap)) {
    const value = env[name];
    if (value === undefined || value === '') continue;
    setPath(merged, path, parse(value));
    fromEnv[path.join('.')] = name;
  }
  return validateConfig(merged, fromEnv);
}

/** Default configuration with overrides merged in (tests, embedding); validated. */
export function resolveConfig(overrides: Json = {}): Config {
  return validateConfig(deepMerge(readJson(defaultConfigFile, 'config/default.json'), overrides));
}
