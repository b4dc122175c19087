import { z } from 'zod';
import { type Fit, parsePosition } from '../core/layout/index.js';
import { renamedKernels } from '../core/kernels/index.js';
import { FoldwiseError } from '../errors.js';
import { hexColour } from './colour.js';
import { decimal, digits, parseQuery, type RawQuery } from './query.js';

export const fitModes = ['contain', 'cover', 'fill', 'scale-down'] as const satisfies readonly Fit[];
export const formatChoices = ['jpeg', 'png', 'webp', 'avif', 'gif'] as const;
export const lightModes = ['linear', 'encoded'] as const;
/** Values of CSS's `color-gamut` media feature (Media Queries Level 4), plus `source`. */
export const gamutChoices = ['source', 'srgb', 'p3', 'rec2020'] as const;
export const enlargeModes = ['limited', 'allowed'] as const;
export type OutputFormatChoice = (typeof formatChoices)[number];

/** Old spellings of enum values, per parameter, and what a 400 says about each (names the new one). */
const renamed: Record<string, Readonly<Record<string, string>>> = {
  kernel: Object.fromEntries(Object.entries(renamedKernels).map(([old, now]) => [old, `is now spelled "${now}"`])),
  format: { auto: 'is no longer a value: leave format out and it is negotiated on Accept' },
};

/** The error of an enum parameter: what replaced an old spelling, else the accepted values. */
function enumError(name: string, values: readonly string[]) {
  return (issue: { input?: unknown }) => {
    const input = String(issue.input);
    const phrase = Object.hasOwn(renamed[name] ?? {}, input) ? renamed[name][input] : undefined;
    return phrase ? `${name} "${input}" ${phrase}` : `${name} must be one of ${values.join(', ')}`;
  };
}

/** Compile-time options of the rendition query: limits and the core's kernel table. */
export interface RenditionQueryOptions {
  maxDimension: number;
  kernelNames: readonly string[];
}

/**
 * The zod shape of every rendition parameter (DESIGN.md's table). Exported as a shape so other
 * endpoints that take "the same parameters" (alias risk, ingest) can extend it.
 */
export function renditionQueryShape(o: RenditionQueryOptions) {
  const kernels = ['auto', ...o.kernelNames] as [string, ...string[]];
  return {
    width: digits('width', 1, o.maxDimension)
      .optional()
      .meta({ description: 'Target width in CSS pixels; on /v1/renditions also the keyword hinted (with slot): the width from Client Hints.' }),
    height: digits('height', 1, o.maxDimension).optional().meta({ description: 'Target height in CSS pixels.' }),
    density: decimal('density', 0.5, 4)
      .default(1)
      .meta({ description: 'Pixel density (as in srcset); multiplies width and height.' }),
    fit: z
      .enum(fitModes, { error: enumError('fit', fitModes) })
      .default('contain')
      .meta({ description: 'CSS object-fit when both sides are given (default contain: nothing cropped, nothing distorted). With one side given the other follows the aspect ratio.' }),
    position: z
      .string()
      .max(64)
      .transform((text, ctx) => {
        const p = parsePosition(text);
        if (!p) ctx.addIssue({ code: 'custom', message: 'position must be a CSS object-position, e.g. "left top" or "30% 70%"' });
        return p ?? { x: 0.5, y: 0.5 };
      })
      .pipe(z.object({ x: z.number().min(0).max(1), y: z.number().min(0).max(1) }))
      .default({ x: 0.5, y: 0.5 })
      .meta({ description: 'CSS object-position for cover and contain: keywords or percentages. Default "50% 50%".' }),
    format: z
      .enum(formatChoices, { error: enumError('format', formatChoices) })
      .optional()
      .meta({ description: 'Output format. Left out, it is negotiated on Accept and the answer sends Vary: Accept.' }),
    quality: digits('quality', 1, 100).optional().meta({ description: 'Encoder quality; default per format.' }),
    background: hexColour('background must be a hex colour: #rgb or #rrggbb (write # as %23, or leave it out)', '#ffffff')
      // prefault keeps no default in the JSON schema: the OpenAPI text states it here.
      .meta({ description: 'Colour of contain bars and of alpha flattened into JPEG.', default: '#ffffff' }),
    kernel: z
      .enum(kernels, { error: enumError('kernel', kernels) })
      .default('auto')
      .meta({ description: 'Reconstruction kernel; auto picks one for the scale factor.' }),
    prefilter: z
      .union([z.enum(['auto', 'none']), decimal('prefilter', 0, 64)], {
        error: 'prefilter must be auto, none or a sigma from 0 to 64 (source pixels)',
      })
      .transform((v) => (v === 0 ? ('none' as const) : v))
      .default('auto')
      .meta({ description: 'Gaussian prefilter: auto, none, or a sigma in source pixels.' }),
    light: z
      .enum(lightModes, { error: 'light must be linear or encoded' })
      .default('linear')
      .meta({ description: 'Resample in linear light, or in the encoded values (legacy match).' }),
    gamut: z
      .enum(gamutChoices, { error: enumError('gamut', gamutChoices) })
      .default('source')
      .meta({
        description:
          "The rendition's colour space, named as CSS's color-gamut media feature. source (default), p3 and rec2020 keep a wide-gamut source wide, as Display P3 (a profile wider than P3 is converted to it); srgb converts every source to sRGB. An sRGB source stays sRGB.",
      }),
    still: digits('still', 1, 100_000)
      .optional()
      .meta({ description: 'One frame of an animated source as a still picture (for posters), counted from 1. Left out, an animation stays animated.' }),
    enlarge: z
      .enum(enlargeModes, { error: 'enlarge must be limited or allowed' })
      .default('limited')
      .meta({
        description:
          'limited (default): at most limits.enlargement.default x the source (1: never beyond it); allowed: up to limits.enlargement.allowed x. Past the cap the rendition is made smaller (same shape) and the answer says so in Rendition-Clamped.',
      }),
    signature: z
      .string()
      .regex(/^[A-Za-z0-9_-]{1,256}$/, 'signature must be URL-safe base64')
      .optional()
      .meta({ description: 'HMAC of the path and canonical query, when signing is on.' }),
  };
}

export type RenditionQuery = z.output<z.ZodObject<ReturnType<typeof renditionQueryShape>>>;

/** Compiles the rendition query once (at registration); `parse` validates one raw query. */
export function compileRenditionQuery(o: RenditionQueryOptions) {
  const schema = z.strictObject(renditionQueryShape(o));
  return {
    schema,
    parse(raw: RawQuery): RenditionQuery {
      const q = parseQuery(schema, raw);
      if (q.width === undefined && q.height === undefined) {
        throw new FoldwiseError('ERR_PARAM_MISSING', 'give width, height, or both');
      }
      return q;
    },
  };
}
