import { keyOf, samePitch, type SpelledPitch } from '../pitch/index.js';
import type { InPlaceRetuning } from './output.js';
import type { Voice } from './voice-book.js';

export interface Respelling {
  readonly voice: Voice;
  readonly pitch: SpelledPitch;
}

/** What respelling the sounding voices means: units to retune in place, and voices to strike again. */
export interface RespellPlan {
  /** Each unit whose every voice changes the same way: retune it (the first voice names it) and the notes ring on. */
  readonly retune: ReadonlyArray<readonly Respelling[]>;
  /** Voices that change but whose unit cannot be retuned as a whole. */
  readonly restrike: readonly Respelling[];
}

/**
 * Plans a respelling of what sounds now (a sustained chord after a flip, say). A tuning unit (a
 * bend channel, an MTS slot or key class) is retuned in place only when every voice in it takes
 * the same new spelling and none stays as it was; otherwise its changing voices are struck again.
 */
export function planRespelling(voices: readonly Voice[], spellingNow: (voice: Voice) => SpelledPitch, inPlace: InPlaceRetuning | undefined): RespellPlan {
  const changes = new Map<number, Respelling[]>();
  const unchanged = new Set<number>();
  for (const voice of voices) {
    const pitch = spellingNow(voice);
    const unit = inPlace ? inPlace.unitOf(voice.placement) : -1;
    if (samePitch(pitch, voice.pitch) || keyOf(pitch) !== keyOf(voice.pitch)) unchanged.add(unit);
    else changes.set(unit, [...(changes.get(unit) ?? []), { voice, pitch }]);
  }
  const retune: Respelling[][] = [];
  const restrike: Respelling[] = [];
  for (const [unit, list] of changes) {
    const uniform = list.every((c) => c.pitch.fifths === list[0]!.pitch.fifths);
    if (inPlace && unit >= 0 && uniform && !unchanged.has(unit)) retune.push(list);
    else restrike.push(...list);
  }
  return { retune, restrike };
}
