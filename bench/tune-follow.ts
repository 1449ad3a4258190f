// A parameter sweep for the follow speller over the five corpora (run by hand; not part of `npm run bench`):
// npm run build && node dist/bench/tune-follow.js '[{"homeStrength": 0.01}, {"localShare": 0.3}]'
import { DEFAULT_FOLLOW, FollowSpeller, type FollowParameters } from '../src/spelling/follow.js';
import { CORPORA, corpusDir, loadCorpus } from './corpus.js';
import { scoreCorpus } from './spelling.js';

const corpora = CORPORA.map((name) => ({ name, movements: loadCorpus(corpusDir(name)) }));
const grid: Partial<FollowParameters>[] = JSON.parse(process.argv[2] ?? '[{}]') as Partial<FollowParameters>[];
for (const change of grid) {
  const p = { ...DEFAULT_FOLLOW, ...change };
  const figures = corpora.map(({ name, movements }) => {
    const s = scoreCorpus(movements, () => new FollowSpeller(p));
    return { name, pct: (100 * s.correct) / s.notes };
  });
  const min = Math.min(...figures.map((f) => f.pct));
  const mean = figures.reduce((a, f) => a + f.pct, 0) / figures.length;
  process.stdout.write(`${figures.map((f) => `${f.name.slice(0, 5)} ${f.pct.toFixed(2)}`).join('  ')}  min ${min.toFixed(2)} mean ${mean.toFixed(3)}  ${JSON.stringify(change)}\n`);
}
