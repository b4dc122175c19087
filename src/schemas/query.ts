import { z } from 'zod';
import { FoldwiseError } from '../errors.js';

/** A raw query as Fastify parses it: a repeated key arrives as an array. */
export type RawQuery = Record<string, unknown>;

/** A whole number written in plain decimal digits, then range-checked. */
export function digits(name: string, min: number, max: number) {
  const message = `${name} must be an integer from ${min} to ${max}`;
  return z
    .string()
    .regex(/^\d{1,9}$/, message)
    .transform(Number)
    .pipe(z.number().int().min(min, message).max(max, message));
}

/** A plain decimal number (no exponent, no sign, no hex), then range-checked. */
export function decimal(name: string, min: number, max: number) {
  const message = `${name} must be a number from ${min} to ${max}`;
  return z
    .string()
    .regex(/^\d{1,6}(\.\d{1,6})?$/, message)
    .transform(Number)
    .pipe(z.number().min(min, message).max(max, message));
}

/**
 * Validates a raw query against a strict zod object. Repeated keys, unknown keys and bad values
 * become FoldwiseErrors with stable codes (ERR_PARAM_REPEATED, ERR_PARAM_UNKNOWN,
 * ERR_PARAM_INVALID), checked in that order so a junk query cannot reach the cache.
 */
export function parseQuery<S extends z.ZodType>(schema: S, raw: RawQuery): z.output<S> {
  const repeated = Object.keys(raw).filter((k) => Array.isArray(raw[k]));
  if (repeated.length > 0) {
    throw new FoldwiseError('ERR_PARAM_REPEATED', `given more than once: ${repeated.join(', ')}`);
  }
  const result = schema.safeParse(raw);
  if (result.success) return result.data;
  const unknown = result.error.issues.flatMap((i) => (i.code === 'unrecognized_keys' ? i.keys : []));
  if (unknown.length > 0) {
    throw new FoldwiseError('ERR_PARAM_UNKNOWN', `unknown parameter: ${unknown.join(', ')}`);
  }
  const issue = result.error.issues[0];
  const name = issue.path.join('.');
  const message = issue.code === 'invalid_type' ? `${name} is not valid` : issue.message;
  throw new FoldwiseError('ERR_PARAM_INVALID', message.startsWith(name) ? message : `${name}: ${message}`);
}
