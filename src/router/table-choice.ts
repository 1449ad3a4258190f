import type { PitchClass } from '../pitch/index.js';
import { EQUAL_TEMPERAMENT } from './equal-temperament.js';
import { PitchTable } from './pitch-table.js';

/**
 * Which pitch table new notes take: the tuning's own; 12-ET while the pass control is on (for
 * comparison); a just table moved to the tonic the speller names. Tables are made once and kept.
 */
export class TableChoice {
  private readonly tables = new Map<string, PitchTable>();

  constructor(readonly base: PitchTable) {}

  /** `tonic` is asked only when it can matter (a just tuning). */
  now(passing: boolean, tonic: () => PitchClass | undefined): PitchTable {
    const base = this.base;
    if (!passing && base.tuning.kind !== 'just') return base;
    const key = passing ? undefined : tonic();
    if (!passing && key === undefined) return base;
    const id = passing ? 'pass' : `tonic ${key!.fifths}`;
    let table = this.tables.get(id);
    if (!table) {
      const tuning = passing ? EQUAL_TEMPERAMENT : base.tuning.kind === 'just' ? base.tuning.withTonic(key!) : base.tuning;
      table = new PitchTable(tuning, base.reference, base.synthA4);
      this.tables.set(id, table);
    }
    return table;
  }
}
