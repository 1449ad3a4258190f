import { DEFAULT_WINDOW, type KeyboardWindow } from '../pitch/index.js';
import { DEFAULT_FOLLOW, FollowSpeller, type FollowParameters } from './follow.js';
import { isMajorLike, type DeclaredKey } from './keys.js';
import { WindowSpeller, type Speller } from './speller.js';

export const STRATEGIES = ['fixed', 'key', 'follow'] as const;
export type Strategy = (typeof STRATEGIES)[number];

export interface StrategyOptions {
  readonly strategy: Strategy;
  readonly window?: KeyboardWindow | undefined;
  /** The declared key (`key`), or where `follow` starts. */
  readonly key?: DeclaredKey | undefined;
  readonly follow?: Partial<FollowParameters> | undefined;
}

/** Builds a spelling strategy: `fixed` (a window), `key` (a declared key's window) or `follow` (the harmony). */
export function createStrategy(options: StrategyOptions): Speller {
  switch (options.strategy) {
    case 'fixed':
      return new WindowSpeller(options.window ?? DEFAULT_WINDOW);
    case 'key':
      return new WindowSpeller(options.key ?? { tonic: { fifths: 0 }, mode: 'major' });
    case 'follow': {
      const key = options.key;
      const initialKey = key ? { tonic: key.tonic.fifths, mode: isMajorLike(key.mode) ? ('major' as const) : ('minor' as const) } : DEFAULT_FOLLOW.initialKey;
      return new FollowSpeller({ ...DEFAULT_FOLLOW, ...options.follow, initialKey });
    }
  }
}
