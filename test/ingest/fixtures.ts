/**
 * Analytic test pictures for the ingest tests (their spectra are known from the formula), and
 * a helper that uploads one through app.inject.
 */
import type { FastifyInstance } from 'fastify';
import sharp from 'sharp';
import { raw8 } from '../helpers/images.js';

/**
 * A vertical cosine grating of `f` cycles per pixel in sRGB codes. Above the new Nyquist
 * frequency 0.5 / s of a downscale by s it must fold (Shannon 1949; CHECKS.md).
 */
export function gratingCode(f: number): (x: number, y: number) => number[] {
  return (x) => {
    const v = Math.round(255 * (0.5 + 0.5 * Math.cos(2 * Math.PI * f * x)));
    return [v, v, v];
  };
}

/** A horizontal ramp: smooth, its spectrum falls off as 1/f^2, nothing near any Nyquist. */
export function rampCode(width: number): (x: number, y: number) => number[] {
  return (x) => {
    const v = Math.round((255 * x) / (width - 1));
    return [v, 255 - v, 128];
  };
}

/** PNG bytes of a width x height RGB picture drawn by `f`. */
export function png(width: number, height: number, f: (x: number, y: number) => number[]): Promise<Buffer> {
  return sharp(raw8(width, height, 3, f), { raw: { width, height, channels: 3 } }).png().toBuffer();
}

/** POSTs image bytes to /v1/ingest with the given query and headers. */
export function upload(app: FastifyInstance, bytes: Buffer, query = '', headers: Record<string, string> = {}) {
  return app.inject({
    method: 'POST',
    url: `/v1/ingest${query}`,
    headers: { 'content-type': 'image/png', ...headers },
    payload: bytes,
  });
}
