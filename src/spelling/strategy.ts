import { DEFAULT_WINDOW, type KeyboardWindow } from '../pitch/index.js';
import { DEFAULT_FOLLOW, FollowSpeller, type FollowParameters } from './follow.js';
import { isMajorLike, type DeclaredKey } from './keys.js';
import { WindowSpeller, type Speller } from './speller.js';

export interface StrategyOptions {
  readonly window?: KeyboardWindow | undefined;
  /** The declared key (`key`), or where `follow` starts. */
  readonly key?: DeclaredKey | undefined;
  readonly follow?: Partial<FollowParameters> | undefined;
}

/** One spelling strategy, declared once: the command line, the setup schema and the docs read it. */
export interface StrategyEntry {
  readonly summary: string;
  /** Whether `--key` means something to it (the key it keeps, or where it starts). */
  readonly usesKey: boolean;
  /** Whether `--window` means something to it. */
  readonly usesWindow: boolean;
  create(options: StrategyOptions): Speller;
}

/** Every spelling strategy. A new one is one file implementing `Speller`, and one entry here. */
export const STRATEGY_ENTRIES = {
  fixed: {
    summary: 'every key keeps one spelling, from a 12-note window (default Eb..G#)',
    usesKey: false,
    usesWindow: true,
    create: (o) => new WindowSpeller(o.window ?? DEFAULT_WINDOW),
  },
  key: {
    summary: "the window of a declared key (--key), which a control can change",
    usesKey: true,
    usesWindow: false,
    create: (o) => new WindowSpeller(o.key ?? { tonic: { fifths: 0 }, mode: 'major' }),
  },
  follow: {
    summary: 'follows the harmony as it is played and spells in the key it finds',
    usesKey: true,
    usesWindow: false,
    create(o) {
      const key = o.key;
      const initialKey = key ? { tonic: key.tonic.fifths, mode: isMajorLike(key.mode) ? ('major' as const) : ('minor' as const) } : DEFAULT_FOLLOW.initialKey;
      return new FollowSpeller({ ...DEFAULT_FOLLOW, ...o.follow, initialKey });
    },
  },
} as const satisfies Record<string, StrategyEntry>;

export type Strategy = keyof typeof STRATEGY_ENTRIES;
export const STRATEGIES = Object.keys(STRATEGY_ENTRIES) as [Strategy, ...Strategy[]];

/** Builds a spelling strategy by name. */
export function createStrategy(options: StrategyOptions & { readonly strategy: Strategy }): Speller {
  return STRATEGY_ENTRIES[options.strategy].create(options);
}
