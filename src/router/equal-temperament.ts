import { fromCents, regularTuning } from '../tuning/index.js';

/** 12-tone equal temperament, for the pass control (compare the tuning against it). */
export const EQUAL_TEMPERAMENT = regularTuning(fromCents(700));
