import { bendMode } from './bend-output.js';
import { mtsNoteMode } from './mts-note-output.js';
import { mtsOctaveMode } from './mts-octave-output.js';
import type { OutputModeEntry } from './output.js';
import { passMode } from './pass-output.js';
import { samplesMode } from './samples-output.js';

/**
 * Every output mode, declared once: the command line's choices, the setup schema, summaries and
 * the engine all read this. A new mode is one file exporting its entry, and one line here.
 */
export const OUTPUT_MODES = {
  bend: bendMode,
  'mts-note': mtsNoteMode,
  'mts-octave': mtsOctaveMode,
  pass: passMode,
  samples: samplesMode,
} as const satisfies Record<string, OutputModeEntry>;

export type OutputMode = keyof typeof OUTPUT_MODES;
export const OUTPUT_MODE_IDS = Object.keys(OUTPUT_MODES) as [OutputMode, ...OutputMode[]];

export function outputMode(mode: OutputMode): OutputModeEntry {
  return OUTPUT_MODES[mode];
}
