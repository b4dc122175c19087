import { z } from 'zod';
import { digits } from './query.js';
import { renditionQueryShape } from './rendition.js';

/** Formats a manifest may list; never a negotiated one (the URLs must be fixed). */
export const ingestFormats = ['webp', 'avif', 'jpeg', 'png'] as const;
export type IngestFormat = (typeof ingestFormats)[number];

/** At most this many widths per request: a ladder, not a sweep (bounds the render work). */
export const MAX_LADDER_WIDTHS = 24;

function commaList<T extends z.ZodType<unknown, string>>(name: string, item: T, max: number) {
  return z
    .string()
    .transform((s) => s.split(',').map((p) => p.trim()))
    .pipe(
      z
        .array(item)
        .min(1, `${name} must list at least one value`)
        .max(max, `${name} may list at most ${max} values`),
    )
    .refine((list) => new Set(list as unknown[]).size === list.length, `${name} lists a value twice`);
}

/** Query of POST /v1/ingest, compiled once per app for its width limit. */
export function ingestQuerySchema(maxDimension: number) {
  return z.strictObject({
    widths: commaList('widths', digits('widths', 1, maxDimension), MAX_LADDER_WIDTHS)
      .optional()
      .meta({ description: 'Comma list of widths; default 160..2560 capped at the source width.' }),
    formats: commaList('formats', z.enum(ingestFormats, 'formats: each must be webp, avif, jpeg or png'), ingestFormats.length)
      .optional()
      .meta({ description: 'Comma list of formats; default ingest.formats (avif,jpeg: measured, see README).' }),
    digest: z
      .string()
      .regex(/^[0-9a-f]{64}$/, 'digest must be the SHA-256 of the upload as 64 lowercase hex characters')
      .optional()
      .meta({ description: 'SHA-256 (hex) of the uploaded bytes; a signed upload URL needs it, and the body must match.' }),
    source: z
      .string()
      .min(1, 'source must name a path in the origin')
      .max(1024)
      .optional()
      .meta({ description: 'The source a signed URL may ingest; the JSON body must name the same one.' }),
    sizes: z
      .string()
      .max(512, 'sizes may be at most 512 characters')
      .regex(/^[A-Za-z0-9 ().,:%+*\/-]+$/, 'sizes must be an HTML sizes value, e.g. "(max-width: 600px) 100vw, 600px"')
      .optional()
      .meta({ description: 'The sizes attribute of the html (HTML Living Standard); default 100vw.' }),
    // The rendition parameters an upload may set for every rung; checked by the rendition
    // query itself (the same codes as GET /v1/renditions), so only their text is bounded here.
    prefilter: z.string().max(32).optional().meta({ description: 'As for a rendition: auto (default), none, or a Gaussian sigma in source px.' }),
    kernel: z.string().max(32).optional().meta({ description: 'As for a rendition: auto (default) or a kernel name.' }),
    light: z.string().max(32).optional().meta({ description: 'As for a rendition: linear (default) or encoded.' }),
    callback: z
      .string()
      .min(1)
      .max(2048)
      .optional()
      .meta({ description: 'URL POSTed the outcome (signed JSON) when the job ends; on the upstream allowlist. Implies an asynchronous job.' }),
    // The very signature parameter of the rendition query (one definition of its syntax).
    signature: renditionQueryShape({ maxDimension, kernelNames: [] }).signature,
  });
}
export type IngestQuery = z.output<ReturnType<typeof ingestQuerySchema>>;

/** JSON body naming a source that is already in the folder origin. */
export const ingestSourceBody = z.strictObject({
  source: z.string().min(1, 'source must name a path in the origin').max(1024),
});

const riskLevel = z.enum(['low', 'moderate', 'high']);

/** The manifest POST /v1/ingest answers (and GET /v1/ingest/jobs/{id} once done). */
export const manifestSchema = z
  .object({
    source: z.object({
      key: z.string().meta({ description: 'Path of the source in the folder origin.' }),
      width: z.number().int(),
      height: z.number().int(),
      frames: z
        .number()
        .int()
        .optional()
        .meta({ description: 'Present when the source is animated: its frame count. WebP and GIF renditions keep every frame; other formats show the first. Widths and risk come from the first frame.' }),
    }),
    renditions: z.array(
      z.object({
        url: z.string().meta({ description: 'GET this for the rendition (a cache hit after ingest).' }),
        width: z.number().int(),
        height: z.number().int(),
        format: z.enum(ingestFormats),
        bytes: z.number().int(),
        etag: z.string(),
        risk: z.object({ level: riskLevel, score: z.number() }),
      }),
    ),
    srcset: z.record(z.string(), z.string()).meta({ description: 'One srcset string per format.' }),
    sizes: z.string().meta({ description: 'The sizes the html uses: as asked, default 100vw.' }),
    src: z.string().meta({ description: 'Default src: the fallback format, widest rendition up to 1080 px.' }),
    html: z.string().meta({
      description:
        'A ready <picture> element (alt left empty for the CMS to fill): width and height reserve the box (no layout shift), loading=lazy, decoding=async.',
    }),
    placeholder: z
      .object({
        dataUri: z.string().meta({ description: 'A linear-light WebP rendition 32 px wide (a few hundred bytes), as a data URI.' }),
        width: z.number().int(),
        height: z.number().int(),
        bytes: z.number().int().meta({ description: 'Bytes of the WebP (the data URI is about 4/3 of it).' }),
        mean: z.string().meta({ description: 'The mean colour in linear light, as CSS hex #rrggbb.' }),
      })
      .meta({ description: 'A tiny preview for lazy loading, from the rendition pipeline.' }),
    htmlWithPlaceholder: z.string().meta({ description: 'html that shows the mean colour and the placeholder in the box until the image paints over them; the plain html for a picture with transparency.' }),
    warnings: z.array(z.string()).meta({ description: 'Alias-risk warnings in plain words.' }),
  })
  .meta({ title: 'IngestManifest' });

/** The state of an asynchronous ingest job. */
export const jobSchema = z
  .object({
    id: z.string(),
    state: z.enum(['queued', 'running', 'done', 'failed']),
    createdAt: z.string(),
    finishedAt: z.string().optional(),
    manifest: manifestSchema.optional(),
    error: z.object({ code: z.string(), detail: z.string() }).optional(),
  })
  .meta({ title: 'IngestJob' });
