/**
 * The alias-risk JSON report as the OpenAPI document describes it (the body is built in
 * src/risk/report.ts from src/core/risk's RiskReport; this schema documents its fields).
 */
import { z } from 'zod';

const pair = (what: string) => z.object({ x: z.number(), y: z.number() }).meta({ description: what });
const freq = (what: string) => z.object({ fx: z.number(), fy: z.number() }).meta({ description: what });

export const patternSchema = z
  .object({
    kind: z.enum(['fold', 'beat', 'clean']).meta({
      description: 'fold: content above the new Nyquist lands at a false frequency; beat: a line between 0.85x and 1x the new Nyquist swells and fades with period 1/(1 - 2u) output px; clean: passes cleanly.',
    }),
    frequency: freq('Source frequency, signed, cycles per source pixel.'),
    apparent: freq('Where the viewer sees it, cycles per output pixel: the folded frequency, or a beat\'s own frequency.'),
    cyclesPerDegree: z.number().meta({ description: 'Frequency at which the threshold is taken (for a beat, its carrier), cycles per degree at the stated viewing.' }),
    contrast: z.number().meta({ description: 'Michelson contrast of the false pattern in the rendition, linear light (0 when clean).' }),
    threshold: z.number().meta({ description: 'Contrast threshold there: Mannos & Sakrison (1974) CSF, peak sensitivity 200.' }),
    margin: z.number().meta({ description: 'contrast / threshold: 1.0 is just visible.' }),
    description: z.string().meta({ description: 'In plain words: "folds into coarse bands 9.0 px apart", "beats", "passes cleanly".' }),
    source: z.enum(['line', 'broadband']).meta({ description: 'A spectral line, or the broadband fold of all fine detail beyond the new Nyquist.' }),
    passed: z.number().meta({ description: 'Share of the source amplitude the planned filter passes, |Hx Hy|.' }),
  })
  .meta({ title: 'FalsePattern' });

export const riskReportSchema = z
  .object({
    source: z.object({ path: z.string(), width: z.number().int(), height: z.number().int() }),
    target: z.object({ width: z.number().int(), height: z.number().int() }),
    scale: pair('Source extent / target extent per axis.'),
    nyquist: pair('New Nyquist frequency 0.5 / s, cycles per source pixel.'),
    plan: z.object({}).loose().meta({ description: 'The plan: header (as Rendition-Plan), crop, x, y, light, adaptiveSigma, adaptiveCutoff (per-axis factor prefilter=auto put on the kernel cut-off, or null), reason.' }),
    level: z.enum(['low', 'moderate', 'high']).meta({ description: 'low: every false pattern under 1 threshold unit (nothing a viewer will see); moderate: 1 to 3 (faint, on close inspection); high: 3 or more (plainly visible).' }),
    score: z.number().meta({ description: '0..1: log10 of the largest margin from 0.1 (0) to 100 (1); threshold is 1/3.' }),
    margin: z.number().meta({ description: 'Largest margin of any false pattern, threshold units.' }),
    viewing: z.object({ degreesPerPixel: z.number(), density: z.number() }).meta({ description: 'CSS reference pixel (1/96 inch at 28 inches, 0.0213 degrees) divided by density.' }),
    cutoff: pair('Factor on the kernel cut-off per axis in the planned rendition (1 = the kernel\'s own).'),
    patterns: z.array(patternSchema).meta({ description: 'False patterns (and strong clean lines), strongest first.' }),
    advice: z
      .array(z.object({ change: z.string(), effect: z.string(), cost: z.string() }))
      .meta({ description: 'What to change, what it does, and what it costs the picture; never a different width.' }),
    folded: z.object({ unfiltered: z.number(), planned: z.number() }).meta({ description: 'Share of the non-DC energy that folds back, with no prefilter and with the planned filter.' }),
    peaks: z.array(z.object({}).loose()).meta({ description: 'Strongest spectral peaks beyond the new Nyquist: fx, fy, power, kind, aliasTo, passed.' }),
    grid: z.object({}).loose().meta({ description: 'Per region (columns x rows, row-major): margins, the visibility of the false patterns there in threshold units (1.0 = just visible; the map); cells and folded, the folded energy (score 0..1 and share of the region energy).' }),
    recommendedSigma: pair('Gaussian sigma (source px) that brings the folded energy under -40 dB; softens everything.'),
    reason: z.string(),
    animation: z
      .object({ frames: z.number().int(), analysed: z.literal('first frame') })
      .optional()
      .meta({ description: 'Present when the source is animated: its frame count, and which frame the analysis read (the first; every frame is resampled with the same plan).' }),
  })
  .meta({ title: 'AliasRiskReport' });
