import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { resolveEngineCli } from '../../src/cli/engine-options.js';
import { readScoreFile } from '../../src/presets/score-file.js';
import { createEngine } from '../../src/router/setup.js';
import { scoreSpellerOf } from '../../src/score/score-status.js';
import { checkSetup } from '../../src/presets/setup-file.js';
import { tempDir } from '../support/temp.js';

// A Mozart sonata movement's score (corpus/mozart-scores, derived from Craig Stuart Sapp's digital
// edition of the Alte Mozart-Ausgabe, CC BY-NC-SA 4.0: see its LICENSE.md).
const SCORE = join(import.meta.dirname, '..', '..', 'corpus', 'mozart-scores', 'sonata01-2.mxl');

describe('score-restart and score-bar as controls, through the engine', () => {
  it('a program change tells the follower the bar; another restarts it; both are consumed', () => {
    const dir = tempDir('diesis-score-controls-');
    const setup = join(dir, 'setup.json');
    writeFileSync(
      setup,
      JSON.stringify({
        score: SCORE,
        spelling: { strategy: 'fixed' },
        controls: [
          { program: 5, action: 'score-bar', bar: 20 },
          { program: 6, action: 'score-restart' },
        ],
      }),
    );
    const { options, speller } = resolveEngineCli({ setup });
    const { router } = createEngine(options);
    const follower = scoreSpellerOf(speller)!;
    expect(follower).toBeDefined();
    const score = readScoreFile(SCORE);
    const bar20 = score.measures.findIndex((m) => m.number === '20');
    const keysOf = (measure: number): number[] => score.groups.slice(score.measures[measure]!.firstGroup, score.measures[measure]!.endGroup).flatMap((g) => g.keys);
    router.start(0);
    expect(router.process(10, [0xc0, 5])).toEqual([]); // consumed: no program change reaches the synth // consumed: no program change reaches the synth
    let time = 100;
    for (const key of keysOf(bar20).slice(0, 1)) {
      router.process((time += 200), [0x90, key, 70]);
      router.process(time + 100, [0x80, key, 0]);
    }
    expect(follower.currentBar()).toBe('20');
    router.process((time += 200), [0xc0, 6]);
    for (const key of keysOf(0).slice(0, 1)) {
      router.process((time += 200), [0x90, key, 70]);
      router.process(time + 100, [0x80, key, 0]);
    }
    expect(follower.currentBar()).toBe(score.measures[0]!.number);
  });

  it('score-bar needs its bar', () => {
    const { problems } = checkSetup(JSON.stringify({ controls: [{ program: 5, action: 'score-bar' }] }), 's.json');
    expect(problems.map((p) => p.message)).toEqual(['"score-bar" needs the "bar" it goes to, such as 12']);
  });
});
