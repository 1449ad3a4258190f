import { z } from 'zod';
import { KEY_NAMES, type KeyNames } from '../spelling/key-names.js';
import { parseWindow } from '../pitch/index.js';
import { OUTPUT_MODE_IDS } from '../router/output-modes.js';
import { ACTION_NAMES } from '../spelling/control-map.js';
import { STRATEGIES } from '../spelling/strategy.js';

const channel = z.number().int().min(1).max(16);
const midiValue = z.number().int().min(0).max(127);

const action = z.enum(ACTION_NAMES);

const bar = z.union([z.string(), z.number().int().min(0)]);
const zone = z.strictObject({
  from: midiValue,
  to: midiValue,
  action,
  key: z.string().optional(),
  bar: bar.optional(),
  tuning: z.string().optional(),
  reference: z.string().optional(),
  latch: z.boolean().optional(),
});

/** One control: what triggers it (cc, zones, note or program) and what it does. */
export const controlSchema = z
  .strictObject({
    cc: midiValue.optional(),
    threshold: z.number().int().min(1).max(127).optional(),
    zones: z.array(zone).min(1).optional(),
    note: midiValue.optional(),
    program: midiValue.optional(),
    channel: channel.optional(),
    source: z.number().int().min(0).optional(),
    action: action.optional(),
    key: z.string().optional(),
    bar: bar.optional(),
    /** For set-tuning: the tuning (a built-in id or a file beside the setup) and, optionally, its reference. */
    tuning: z.string().optional(),
    reference: z.string().optional(),
    latch: z.boolean().optional(),
  })
  .refine((c) => [c.cc, c.note, c.program].filter((x) => x !== undefined).length === 1, { error: 'give exactly one of "cc", "note" or "program"' })
  .refine((c) => (c.zones === undefined) !== (c.action === undefined), { error: 'give either "action" or "zones"' })
  .refine((c) => c.zones === undefined || c.cc !== undefined, { error: '"zones" belong to a controller ("cc")' });

export const splitKeySchema = z
  .strictObject({
    channel: channel.optional(),
    source: z.number().int().min(0).optional(),
    key: midiValue.optional(),
    spelling: z.string().optional(),
    window: z.string().optional(),
  })
  .refine((s) => (s.spelling === undefined) !== (s.window === undefined), { error: 'give either "spelling" (with "key") or "window"' })
  .refine((s) => s.spelling === undefined || s.key !== undefined, { error: '"spelling" needs the "key" it applies to' });

/** A performance setup: everything a concert needs, so a player starts with one short command. */
export const setupSchema = z.strictObject({
  $schema: z.string().optional(),
  name: z.string().optional(),
  description: z.string().optional(),
  tuning: z.string().optional(),
  reference: z.string().optional(),
  /** A MusicXML score to follow (.musicxml, .xml, .mxl), relative to the setup file's folder. */
  score: z.string().optional(),
  spelling: z
    .strictObject({
      strategy: z.enum(STRATEGIES).optional(),
      window: z.string().optional(),
      key: z.string().optional(),
      gatherMs: z.number().min(0).max(100).optional(),
      follow: z
        .strictObject({
          halfLifeMs: z.number().positive().optional(),
          heldWeight: z.number().min(0).optional(),
          hysteresis: z.number().min(0).max(2).optional(),
          initialWeight: z.number().min(0).optional(),
          homeWindow: z
            .string()
            .transform((text, ctx) => {
              try {
                return parseWindow(text, 'homeWindow');
              } catch (error) {
                ctx.addIssue({ code: 'custom', message: error instanceof Error ? error.message : String(error) });
                return z.NEVER;
              }
            })
            .optional(),
          homeStrength: z.number().min(0).max(1).optional(),
          localHalfLifeMs: z.number().positive().max(60_000).optional(),
          localShare: z.number().min(0).max(1).optional(),
          chordCompactness: z.number().min(0).max(10).optional(),
          keyNames: z.enum(Object.keys(KEY_NAMES) as [KeyNames, ...KeyNames[]]).optional(),
        })
        // The names become the naming centre the follow speller takes (see KEY_NAMES).
        .transform(({ keyNames, ...rest }) => (keyNames === undefined ? rest : { ...rest, namingCentre: KEY_NAMES[keyNames] }))
        .optional(),
    })
    .optional(),
  output: z
    .strictObject({
      mode: z.enum(OUTPUT_MODE_IDS).optional(),
      layout: z.enum(['mpe', 'multi']).optional(),
      channels: z.string().optional(),
      bendRange: z.number().min(0.01).max(96).optional(),
      sendBendRange: z.boolean().optional(),
      releaseGuardMs: z.number().int().min(0).max(60_000).optional(),
      synthA4: z.number().min(300).max(600).optional(),
      mtsDevice: midiValue.optional(),
      mtsProgram: midiValue.optional(),
      octaveForm: z.union([z.literal(1), z.literal(2)]).optional(),
    })
    .optional(),
  keyboard: z.strictObject({ wheelRange: z.number().min(0.01).max(96).optional() }).optional(),
  controls: z.array(controlSchema).optional(),
  splitKeys: z.array(splitKeySchema).optional(),
});

export type SetupJson = z.infer<typeof setupSchema>;
export type ControlJson = z.infer<typeof controlSchema>;
export type SplitKeyJson = z.infer<typeof splitKeySchema>;
