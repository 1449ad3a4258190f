import { z } from 'zod';

const text = z.string().min(1, 'must not be empty');

/** How a preset writes one interval; see `IntervalSpec` in src/tuning/interval-spec.ts. */
export const intervalSpecSchema = z.union([
  z.string().min(1),
  z.strictObject({ ratio: z.string(), temper: z.string().optional() }),
  z.strictObject({ cents: z.union([z.number(), z.string()]) }),
  z.strictObject({ edo: z.number().int().positive(), steps: z.number().int().optional() }),
], { error: 'must be "pure", a tempering such as "-1/4 syntonic", or an object with ratio, cents or edo' });

const common = {
  $schema: z.string().optional(),
  name: text,
  description: text,
  source: text.describe('the published source of the tuning'),
  reference: z.string().optional().describe('default reference pitch, as A4=415'),
};

const regularPresetSchema = z.strictObject({
  ...common,
  kind: z.literal('regular'),
  fifth: intervalSpecSchema,
  origin: z.string().optional(),
});

const justPresetSchema = z.strictObject({
  ...common,
  kind: z.literal('just'),
  tonic: z.string().optional(),
  degrees: z.record(z.string(), z.string()).refine((d) => Object.keys(d).length > 0, 'must list at least the tonic'),
});

const nonNegative = z.number().nonnegative();

/** Adaptive just intonation: a just table (as `just`) behind a tuner whose settings are listed here (all optional). */
const justAdaptivePresetSchema = z.strictObject({
  ...common,
  kind: z.literal('just-adaptive'),
  tonic: z.string().optional(),
  degrees: z.record(z.string(), z.string()).refine((d) => Object.keys(d).length > 0, 'must list at least the tonic'),
  adaptive: z.strictObject({
    limit: z.union([z.literal(5), z.literal(7)], { error: 'must be 5 or 7' }).optional(),
    minorSeventh: z.enum(['16/9', '9/5']).optional(),
    anchor: nonNegative.optional(),
    snap: nonNegative.optional(),
    recentWeight: nonNegative.optional(),
    recentWhileHeld: z.boolean().optional(),
    recentHalfLifeMs: z.number().positive().optional(),
    phraseGapMs: nonNegative.optional(),
    compromiseCents: nonNegative.optional(),
    glideCentsPerSecond: nonNegative.optional(),
    glideMaxCents: nonNegative.optional(),
  }).optional(),
});

const circulatingPresetSchema = z.strictObject({
  ...common,
  kind: z.literal('circulating'),
  origin: z.string().optional(),
  chain: z.strictObject({ start: z.string(), fifths: z.array(intervalSpecSchema).length(11, 'must list 11 fifths') }).optional(),
  cents: z.record(z.string(), z.union([z.number(), z.string()])).optional(),
}).refine((p) => (p.chain === undefined) !== (p.cents === undefined), { error: 'give either "chain" or "cents", not both or neither' });

export const tuningPresetSchema = z.discriminatedUnion('kind', [regularPresetSchema, justPresetSchema, circulatingPresetSchema, justAdaptivePresetSchema], {
  error: 'kind must be "regular", "just", "circulating" or "just-adaptive"',
});

export type TuningPresetJson = z.infer<typeof tuningPresetSchema>;
