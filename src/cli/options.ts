/**
 * Argument parsers for commander options: each turns a string into a checked value or throws
 * InvalidArgumentError, which commander reports as a usage error (exit 2).
 */
import { InvalidArgumentError } from 'commander';

/** A positive integer within 1..max. */
export function positiveInt(max = 65535): (value: string) => number {
  return (value) => {
    if (!/^[0-9]+$/.test(value)) throw new InvalidArgumentError(`expected a whole number, got "${value}"`);
    const n = Number.parseInt(value, 10);
    if (!(n >= 1 && n <= max)) throw new InvalidArgumentError(`expected 1..${max}, got ${n}`);
    return n;
  };
}

/** A comma list of positive integers, e.g. "320,640,1280". */
export function widthList(max = 65535): (value: string) => number[] {
  const one = positiveInt(max);
  return (value) => {
    const parts = value.split(',').map((p) => p.trim()).filter((p) => p.length > 0);
    if (parts.length === 0) throw new InvalidArgumentError('expected a comma list of widths, e.g. 320,640');
    return parts.map(one);
  };
}

/** A TCP port, 0..65535 (0: any free port, which the server then logs). */
export function portNumber(value: string): number {
  if (!/^[0-9]{1,5}$/.test(value) || Number(value) > 65535) {
    throw new InvalidArgumentError(`expected a port 0..65535, got "${value}"`);
  }
  return Number(value);
}
