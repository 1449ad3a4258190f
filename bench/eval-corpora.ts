// Spelling accuracy of follow and the fixed E♭..G♯ window on every corpus, both halves (run by hand:
// node dist/bench/eval-corpora.js '{"param":value}').
import { DEFAULT_WINDOW } from '../src/pitch/index.js';
import { DEFAULT_FOLLOW, FollowSpeller, type FollowParameters } from '../src/spelling/follow.js';
import { fixedSpeller } from '../src/spelling/speller.js';
import { CORPORA, corpusDir, loadCorpus } from './corpus.js';
import { scoreCorpus } from './spelling.js';

const change = JSON.parse(process.argv[2] ?? '{}') as Partial<FollowParameters>;
const only = process.argv[3]?.split(',');
const p = { ...DEFAULT_FOLLOW, ...change };
const pct = (c: number, n: number): string => ((100 * c) / n).toFixed(2);
let worst = 100;
for (const name of CORPORA) {
  if (only && !only.includes(name)) continue;
  const corpus = loadCorpus(corpusDir(name));
  const t0 = performance.now();
  const f = scoreCorpus(corpus, () => new FollowSpeller(p));
  const ms = performance.now() - t0;
  const x = scoreCorpus(corpus, () => fixedSpeller(DEFAULT_WINDOW));
  const halves = [0, 1].map((h) => f.perMovement.filter((_, i) => i % 2 === h).reduce((a, m) => [a[0]! + m.correct, a[1]! + m.notes], [0, 0]));
  const top = [...f.confusions.entries()].sort((a, b) => b[1] - a[1]).slice(0, 8);
  const worstMov = [...f.perMovement].sort((a, b) => a.correct / a.notes - b.correct / b.notes).slice(0, 3);
  worst = Math.min(worst, (100 * f.correct) / f.notes);
  process.stdout.write(`${name.padEnd(12)} follow ${pct(f.correct, f.notes)} (${halves.map(([c, n]) => pct(c!, n!)).join('/')}) fixed ${pct(x.correct, x.notes)}  ${ms.toFixed(0)}ms  ${top.map(([k, v]) => `${k}:${v}`).join(' ')}\n    worst: ${worstMov.map((m) => `${m.name} ${pct(m.correct, m.notes)}`).join(', ')}\n`);
}
process.stdout.write(`min ${worst.toFixed(2)}\n`);
