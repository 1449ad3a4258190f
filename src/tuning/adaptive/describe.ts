import type { AdaptiveSettings } from './settings.js';

/** What a chart of an adaptive tuning says about itself: the table shown is only where pitches start. */
export function describeAdaptive(settings: AdaptiveSettings): string[] {
  const seventh = settings.limit === 7 ? '7/4 (7-limit)' : settings.minorSeventh;
  return [
    'Pitches follow the harmony: each new note is tuned so its fifths (3/2), thirds (5/4, 6/5) and sixths',
    '(5/3, 8/5) with the notes sounding are pure, as their spelling asks; notes already sounding never move.',
    `The table below is the fixed ${settings.limit}-limit just table behind it: where a phrase starts and where`,
    'the level returns, not where every note will sound (a D in a D minor chord lies a comma below this D).',
    `Drift: anchor ${settings.anchor} (0 = pure now, larger = no drift), snap ${settings.snap}, a new phrase after ${settings.phraseGapMs} ms of silence; minor seventh ${seventh}.`,
  ];
}
