// A parameter sweep for the follow speller over the whole corpus (run by hand; not part of `npm run bench`).
import { DEFAULT_FOLLOW, FollowSpeller, type FollowParameters } from '../src/spelling/follow.js';
import { loadCorpus } from './corpus.js';
import { scoreCorpus } from './spelling.js';

const corpus = loadCorpus();
const grid: Partial<FollowParameters>[] = JSON.parse(process.argv[2] ?? '[{}]') as Partial<FollowParameters>[];
for (const change of grid) {
  const p = { ...DEFAULT_FOLLOW, ...change };
  const s = scoreCorpus(corpus, () => new FollowSpeller(p));
  const top = [...s.confusions.entries()].sort((a, b) => b[1] - a[1]).slice(0, 8);
  process.stdout.write(`${JSON.stringify(change)} ${((100 * s.correct) / s.notes).toFixed(3)}%  ${top.map(([k, v]) => `${k}:${v}`).join(' ')}\n`);
}
