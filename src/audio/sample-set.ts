import { existsSync, statSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { z } from 'zod';
import { alterationOf, chromaOf, formatPitchClass, formatSpelledPitch, keyOf, letterOf, onKey, parseSpelledPitch, rangeClasses, type FifthsRange, type PitchClass } from '../pitch/index.js';
import { formatReference, frequency, parseReference, type Reference, type Tuning } from '../tuning/index.js';
import { jsonPath } from '../presets/problems.js';
import { outputNumber, RECORDED_HZ_DIGITS, roundSignificant } from '../text/output-numbers.js';
import { UserError } from '../util/errors.js';
import { isWithin, listFolder, readInputFile, READ_LIMITS, readTextFile, writeFolder } from '../util/files.js';
import { resample } from './resample.js';
import { releaseEnvelope, renderThroughSynth } from './synth-render.js';
import { readWav, writeWav, type Audio } from './wav.js';

/** A player's sample: its audio and the pitch it was recorded at. */
export interface SourceSample {
  readonly file: string;
  readonly audio: Audio;
  readonly rootKey: number;
  readonly hz: number;
}

/**
 * Reads a folder of samples. The root key of each comes from `map.json` if the folder has one
 * (`{ "file.wav": { "key": 60, "hz": 261.4 } }`, `hz` optional; an entry naming a file that is not
 * a WAV in the folder is an error), else from its name (`rootKeyFromName`), else from the file's
 * own `smpl` chunk. A name that gives no key, or two, is reported, never guessed. A sample is taken
 * to sound its root key in 12-ET at A4 = 440 Hz unless the map gives its frequency.
 */
export function readSourceFolder(dir: string): SourceSample[] {
  const names = listFolder(dir);
  let map: z.infer<typeof sourceMapSchema> = {};
  const files = names.filter((f) => /\.wav$/iu.test(f));
  if (names.includes('map.json')) {
    const mapFile = join(dir, 'map.json');
    map = parseJsonFile(mapFile, sourceMapSchema, 'a sample map ({ "file.wav": { "key": 60, "hz": 261.4 } })');
    for (const entry of Object.keys(map)) {
      const problem = mapEntryProblem(entry, names, files);
      if (problem) throw new UserError(`${mapFile}: "${entry}": ${problem}`);
    }
  }
  if (files.length === 0) throw new UserError(`${dir}: no .wav files`);
  return files.map((f) => {
    const path = join(dir, f);
    const audio = readWav(readInputFile(path, READ_LIMITS.wav), path);
    const entry = map[f];
    const fromName = entry?.key === undefined ? rootKeyFromName(f) : undefined;
    if (fromName?.kind === 'problem') throw new UserError(`${path}: ${fromName.problem}: rename it, or give its key in map.json`);
    const rootKey = entry?.key ?? (fromName?.kind === 'key' ? fromName.key : undefined) ?? audio.rootKey;
    if (rootKey === undefined || rootKey < 0 || rootKey > 127) {
      throw new UserError(`${path}: no root key: name it after its note (C4.wav, Bb3 soft.wav, Fs5.wav) or key number (060.wav, key60.wav), add it to map.json, or give the WAV a smpl chunk`);
    }
    return { file: path, audio, rootKey, hz: entry?.hz ?? 440 * 2 ** ((rootKey - 69) / 12) };
  });
}

/** What is wrong with a `map.json` entry's file name, if anything: it must be a WAV of the folder, spelled as the folder spells it. */
function mapEntryProblem(entry: string, names: readonly string[], wavs: readonly string[]): string | undefined {
  if (wavs.includes(entry)) return undefined;
  if (names.includes(entry)) return 'is not a .wav file: the map lists the WAVs of the folder';
  const nearly = wavs.find((f) => f.toLowerCase() === entry.toLowerCase());
  return `no such file in the folder${nearly ? ` (there is "${nearly}": names must match exactly)` : ''}`;
}

const sourceMapSchema = z.record(z.string(), z.strictObject({ key: z.number().int().min(0).max(127).optional(), hz: z.number().positive().max(20_000).optional() }));

/** Reads a JSON file diesis or the player wrote and validates it; a problem is one line with its place. */
function parseJsonFile<T>(file: string, schema: z.ZodType<T>, what: string): T {
  let json: unknown;
  try {
    json = JSON.parse(readTextFile(file));
  } catch (error) {
    if (error instanceof UserError) throw error;
    throw new UserError(`${file}: not valid JSON (${error instanceof Error ? error.message : String(error)})`);
  }
  const parsed = schema.safeParse(json);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new UserError(`${file}: not ${what}: ${issue ? `${jsonPath(issue.path)}: ${issue.message}` : 'invalid'}`);
  }
  return parsed.data;
}

/** What a sample's file name says of its root key. */
export type NameKey =
  | { readonly kind: 'key'; readonly key: number }
  | { readonly kind: 'none' }
  | { readonly kind: 'problem'; readonly problem: string };

/**
 * A word of a file name (letters and digits around it do not count) naming a note: a capital
 * letter A–G, at most one accidental (`#`, `♯`, `s` for sharp as the set's own files are named;
 * `b`, `♭`), and the octave, −1…9 (C4 = key 60).
 */
const NOTE_WORD = /(?<![\p{L}\p{N}])([A-G])([#♯sb♭]?)(-1|\d)(?![\p{L}\p{N}])/gu;
/** A word naming a key number: three digits (`060`) or `key` and the number (`key60`); a name that is only a number is one too (`60`). */
const NUMBER_WORD = /(?<![\p{L}\p{N}])(?:key(\d{1,3})|(\d{3}))(?![\p{L}\p{N}])/giu;

/**
 * The root key a sample's name gives: a note with octave as a word of the name
 * (`harpsichord-C4.wav`, `Bb3 soft.wav`, `F#5.wav`, `Fs5.wav`) or a key number (`060.wav`,
 * `piano 072.wav`, `key61.wav`, or the number alone: `60.wav`). Anything else gives no key (`s2.wav`, `take 2.wav`, `c4.wav`); a
 * name with two different keys, or a key beyond MIDI's 0–127, is a problem.
 */
export function rootKeyFromName(file: string): NameKey {
  const stem = basename(file).replace(/\.wav$/iu, '');
  const found: Array<{ word: string; key: number }> = [];
  for (const m of stem.matchAll(NOTE_WORD)) {
    const accidental = m[2] === 's' || m[2] === '♯' ? '#' : m[2] === '♭' ? 'b' : m[2]!;
    found.push({ word: m[0], key: keyOf(parseSpelledPitch(`${m[1]!}${accidental}${m[3]!}`)) });
  }
  for (const m of stem.matchAll(NUMBER_WORD)) found.push({ word: m[0], key: Number(m[1] ?? m[2]) });
  if (/^\d{1,2}$/u.test(stem)) found.push({ word: stem, key: Number(stem) });
  const keys = [...new Set(found.map((f) => f.key))];
  if (keys.length === 0) return { kind: 'none' };
  if (keys.length > 1) return { kind: 'problem', problem: `the name gives ${found.map((f) => `${f.word} (key ${f.key})`).join(' and ')}` };
  const key = keys[0]!;
  if (key < 0 || key > 127) return { kind: 'problem', problem: `the name gives ${found[0]!.word}, key ${key}, outside MIDI's 0–127` };
  return { kind: 'key', key };
}

/** The root key in a file name, when the name gives exactly one (see `rootKeyFromName`). */
export function keyFromName(file: string): number | undefined {
  const named = rootKeyFromName(file);
  return named.kind === 'key' ? named.key : undefined;
}

export interface SampleSetRequest {
  readonly sources: readonly SourceSample[];
  readonly tuning: Tuning;
  readonly tuningName: string;
  /** How the tuning is named on the command line (a built-in id, or a file's full path), recorded so the set plays in it by default. */
  readonly tuningId?: string | undefined;
  readonly reference: Reference;
  /** The spellings to build, a stretch of the line of fifths (at most 16: one channel each). */
  readonly range: FifthsRange;
  /** The instrument's compass, lowest and highest key. */
  readonly compass: { readonly low: number; readonly high: number };
  /** Refuse to shift a sample more than this many semitones. */
  readonly maxShift: number;
}

/** A plain file name inside the set's folder (no folder part), so a manifest cannot point elsewhere. */
const fileName = z.string().min(1).refine((n) => !/[/\\]/u.test(n) && n !== '.' && n !== '..', 'must be a plain file name');

/** The manifest a set's folder holds (manifest.json), validated whenever it is read. */
export const manifestSchema = z.object({
  /** "diesis": the set was built by diesis, so diesis may replace it. */
  builtBy: z.literal('diesis').optional(),
  tuningId: z.string().min(1).optional(),
  tuning: z.string(),
  reference: z.string().refine((text) => {
    try {
      parseReference(text);
      return true;
    } catch {
      return false;
    }
  }, 'must be a reference pitch such as A4=415'),
  sampleRate: z.number().int().positive(),
  /** Spelling class → MIDI channel 1…16. */
  layout: z.array(z.object({ spelling: z.string(), fifths: z.number().int(), channel: z.number().int().min(1).max(16) })).min(1).max(16),
  files: z.array(
    z.object({
      file: fileName,
      spelling: z.string(),
      key: z.number().int().min(0).max(127),
      channel: z.number().int().min(1).max(16),
      hz: z.number().positive(),
      source: z.string(),
      shiftCents: z.number(),
    }),
  ),
});

export type Manifest = z.infer<typeof manifestSchema>;
export type ManifestFile = Manifest['files'][number];

export const MANIFEST = 'manifest.json';
export const SFZ = 'diesis.sfz';

/** A file name without `#`: G♯4 → Gs4, B♭3 → Bb3, F𝄪2 → Fss2. */
export function fileStem(pc: PitchClass, octave: number): string {
  const alt = alterationOf(pc);
  return `${letterOf(pc)}${alt > 0 ? 's'.repeat(alt) : 'b'.repeat(-alt)}${octave}`;
}

/**
 * Builds a retuned sample set: for each spelling in the range and each key of the compass it
 * sounds on, the nearest source sample resampled (band-limited) to the spelling's exact
 * frequency, its loop scaled; plus an SFZ mapping and a JSON manifest. Everything is written to a
 * temporary folder first and moved into place at the end, so a failure leaves nothing half-made.
 */
export function buildSampleSet(request: SampleSetRequest, outDir: string, onProgress?: (share: number) => void): Manifest {
  const classes = rangeClasses(request.range);
  if (classes.length > 16) throw new UserError(`the range has ${classes.length} spellings; a sample set gives each its own channel, so at most 16`);
  const rates = new Set(request.sources.map((s) => s.audio.sampleRate));
  if (rates.size > 1) throw new UserError(`the source samples have different sample rates (${[...rates].join(', ')} Hz); convert them to one`);
  const jobs: Array<{ pc: PitchClass; channel: number; key: number }> = [];
  classes.forEach((pc, channel) => {
    for (let key = request.compass.low; key <= request.compass.high; key++) if (isSpellingOf(pc, key)) jobs.push({ pc, channel, key });
  });
  const plans = jobs.map((job) => {
    const pitch = onKey(job.pc, job.key);
    const hz = frequency(request.tuning, request.reference, pitch);
    const source = nearest(request.sources, hz);
    const shift = 12 * Math.log2(hz / source.hz);
    if (Math.abs(shift) > request.maxShift) {
      throw new UserError(`${formatSpelledPitch(pitch)} (${hz.toFixed(2)} Hz) is ${Math.abs(shift).toFixed(2)} semitones from the nearest sample, ${basename(source.file)}; the limit is ${request.maxShift} (add samples, or raise --max-shift)`);
    }
    return { ...job, pitch, hz, source, shift };
  });
  const replacing = setTarget(outDir, request.sources.map((source) => dirname(source.file)));
  let manifest: Manifest | undefined;
  writeFolder(outDir, replacing, (put) => {
    const files: ManifestFile[] = [];
    plans.forEach((plan, i) => {
      const ratio = plan.hz / plan.source.hz;
      const audio = plan.source.audio;
      const loop = audio.loop && { start: Math.round(audio.loop.start / ratio), end: Math.round(audio.loop.end / ratio) };
      const out: Audio = { sampleRate: audio.sampleRate, channels: audio.channels.map((c) => resample(c, ratio)), loop, rootKey: plan.key };
      const name = `${fileStem(plan.pitch, plan.pitch.octave)}.wav`;
      put(name, writeWav(out, 24));
      // Rounded as written (the manifest is read back and checked to 0.01 cent: see RECORDED_HZ_DIGITS).
      const hz = roundSignificant(plan.hz, RECORDED_HZ_DIGITS);
      files.push({ file: name, spelling: formatSpelledPitch(plan.pitch), key: plan.key, channel: plan.channel + 1, hz, source: basename(plan.source.file), shiftCents: outputNumber(plan.shift * 100, 'cents') });
      onProgress?.((i + 1) / plans.length);
    });
    manifest = {
      builtBy: 'diesis',
      ...(request.tuningId === undefined ? {} : { tuningId: request.tuningId }),
      tuning: request.tuningName,
      reference: formatReference(request.reference),
      sampleRate: [...rates][0] ?? 44_100,
      layout: classes.map((pc, channel) => ({ spelling: formatPitchClass(pc), fifths: pc.fifths, channel: channel + 1 })),
      files,
    };
    put(MANIFEST, JSON.stringify(manifest, null, 2) + '\n');
    put(SFZ, sfzText(manifest, plans.map((p) => p.source.audio.loop !== undefined)));
  });
  if (!manifest) throw new Error('the sample set was not written');
  return manifest;
}

/**
 * Decides whether a set may be written to `outDir`, built from the folders `sourceDirs`, and
 * returns the files of an earlier set there that it replaces. diesis never writes into, over or
 * around the player's samples, and replaces an existing folder only when it is empty or holds a
 * set diesis built (its manifest says so); then exactly that set's files are replaced.
 */
export function setTarget(outDir: string, sourceDirs: readonly string[]): string[] {
  for (const source of new Set(sourceDirs.map((d) => resolve(d)))) {
    if (isWithin(outDir, source) && isWithin(source, outDir)) throw new UserError(`--to ${outDir} is the --from folder: diesis never writes over your samples; give a new folder`, 2);
    if (isWithin(outDir, source)) throw new UserError(`--to ${outDir} is inside the --from folder ${source}: the set would mix with your samples; give a folder outside it`, 2);
    if (isWithin(source, outDir)) throw new UserError(`--to ${outDir} contains the --from folder ${source}: replacing it would touch your samples; give a new folder`, 2);
  }
  let names: string[];
  try {
    if (existsSync(outDir) && !statSync(outDir).isDirectory()) throw new UserError(`--to ${outDir} is a file, not a folder; give a folder for the set`);
    names = listFolder(outDir);
  } catch (error) {
    if (error instanceof UserError && / no such folder$/u.test(error.message)) {
      const parent = dirname(resolve(outDir));
      listFolder(parent); // the folder it goes in must exist (one clear line if not)
      return [];
    }
    throw error;
  }
  if (names.length === 0) return [];
  if (!names.includes(MANIFEST)) throw new UserError(`--to ${outDir} already holds ${describeNames(names)} and is not a sample set diesis built; give a new or empty folder`);
  let old: Manifest;
  try {
    old = readManifest(outDir);
  } catch (error) {
    throw new UserError(`--to ${outDir} holds a manifest.json diesis cannot read as its own (${error instanceof Error ? error.message : String(error)}); give a new or empty folder`);
  }
  if (old.builtBy !== 'diesis') throw new UserError(`--to ${outDir} holds a manifest.json that does not say diesis built it (and ${describeNames(names)}); give a new or empty folder`);
  return [...new Set([MANIFEST, SFZ, ...old.files.map((f) => f.file)])];
}

function describeNames(names: readonly string[]): string {
  const shown = names.slice(0, 3).join(', ');
  return `${names.length} ${names.length === 1 ? 'entry' : 'entries'} (${shown}${names.length > 3 ? ', …' : ''})`;
}

function readManifest(dir: string): Manifest {
  return parseJsonFile(join(dir, MANIFEST), manifestSchema, 'a sample-set manifest');
}

function isSpellingOf(pc: PitchClass, key: number): boolean {
  return chromaOf(pc) === ((key % 12) + 12) % 12;
}

function nearest(sources: readonly SourceSample[], hz: number): SourceSample {
  let best = sources[0]!;
  for (const s of sources) if (Math.abs(Math.log2(hz / s.hz)) < Math.abs(Math.log2(hz / best.hz))) best = s;
  return best;
}

/** SFZ (an open sampler format): one group per spelling on its channel, one region per key, no transposition. */
function sfzText(manifest: Manifest, looped: readonly boolean[]): string {
  const lines = [`// diesis sample set: ${manifest.tuning} at ${manifest.reference} Hz. Each spelling sounds on its own MIDI channel.`];
  for (const { spelling, channel } of manifest.layout) {
    lines.push('', `// ${spelling}`, `<group> lochan=${channel} hichan=${channel} pitch_keytrack=100`);
    manifest.files.forEach((f, i) => {
      if (f.channel !== channel) return;
      lines.push(`<region> sample=${f.file} lokey=${f.key} hikey=${f.key} pitch_keycenter=${f.key}${looped[i] ? ' loop_mode=loop_continuous' : ''}`);
    });
  }
  return lines.join('\n') + '\n';
}

/** A built set, ready for the bridge (its layout) and for the preview (its audio, read when first needed). */
export interface LoadedSampleSet {
  readonly dir: string;
  readonly manifest: Manifest;
  readonly layout: ReadonlyMap<number, number>;
  audio(channel: number, key: number): Audio | undefined;
}

export function loadSampleSet(dir: string): LoadedSampleSet {
  const names = listFolder(dir);
  if (!names.includes(MANIFEST)) throw new UserError(`${dir}: not a sample set (no manifest.json; make one with "diesis samples")`);
  const manifest = readManifest(dir);
  const layout = new Map(manifest.layout.map((l) => [l.fifths, l.channel - 1]));
  const byKey = new Map(manifest.files.map((f) => [`${f.channel - 1}:${f.key}`, f.file]));
  const cache = new Map<string, Audio>();
  return {
    dir,
    manifest,
    layout,
    audio(channel, key) {
      const id = `${channel}:${key}`;
      const name = byKey.get(id);
      if (!name) return undefined;
      let audio = cache.get(id);
      if (!audio) {
        audio = readWav(readInputFile(join(dir, name), READ_LIMITS.wav), join(dir, name));
        cache.set(id, audio);
      }
      return audio;
    },
  };
}

/** Plays diesis's MIDI output through a sample set, as a sampler would: each note its own sample, no transposition. */
export function playSampleSet(messages: ReadonlyArray<{ time: number; data: readonly number[] }>, set: LoadedSampleSet, sampleRate: number, progress?: (share: number) => void): Audio {
  const release = 0.15;
  const out = renderThroughSynth(
    messages,
    sampleRate,
    release,
    (voice) => {
      const audio = set.audio(voice.channel, voice.key);
      if (!audio) return undefined;
      const data = audio.channels[0]!;
      const step = audio.sampleRate / sampleRate;
      const gain = 0.5 * (voice.velocity / 127) ** 1.5;
      let position = 0;
      let age = 0;
      let endedAt: number | undefined;
      return {
        play(buffer, from, to, _hz, ended) {
          if (ended && endedAt === undefined) endedAt = age;
          for (let n = from; n < to; n++) {
            if (audio.loop && position >= audio.loop.end) position = audio.loop.start + ((position - audio.loop.start) % (audio.loop.end - audio.loop.start));
            const i = Math.floor(position);
            if (i + 1 >= data.length) return;
            const v = data[i]! + (data[i + 1]! - data[i]!) * (position - i);
            buffer[n]! += gain * releaseEnvelope(endedAt === undefined ? undefined : age - endedAt, sampleRate, release) * v;
            position += step;
            age++;
          }
        },
      };
    },
    progress,
  );
  return { sampleRate, channels: [out] };
}

/**
 * Checks that a set is played as it was built: in the samples mode, and in the tuning and at the
 * reference it was built for (each sample's recorded frequency against the one the engine would
 * give its spelling now). A mismatch is one line saying what the set was built for.
 */
export function checkSetPlays(set: LoadedSampleSet, use: { readonly tuning: Tuning; readonly tuningName: string; readonly reference: Reference; readonly mode?: string | undefined }): void {
  const { manifest } = set;
  const builtFor = `${manifest.tuning} at ${manifest.reference} Hz`;
  if (use.mode !== undefined && use.mode !== 'samples') {
    throw new UserError(`--sample-set ${set.dir} is played by --mode samples (it was built for ${builtFor}); drop --mode ${use.mode}`, 2);
  }
  let worst: { cents: number; spelling: string } | undefined;
  for (const f of manifest.files) {
    const now = frequency(use.tuning, use.reference, parseSpelledPitch(f.spelling));
    const cents = 1200 * Math.log2(now / f.hz);
    if (Math.abs(cents) > 0.01 && (!worst || Math.abs(cents) > Math.abs(worst.cents))) worst = { cents, spelling: f.spelling };
  }
  if (!worst) return;
  const hint = manifest.tuningId ? `play it with -t ${manifest.tuningId} --ref ${manifest.reference}` : `play it in ${builtFor}`;
  throw new UserError(
    `--sample-set ${set.dir} was built for ${builtFor}, not ${use.tuningName} at ${formatReference(use.reference)} Hz (its ${worst.spelling} would be ${Math.abs(worst.cents).toFixed(2)} cents off): ${hint}, or build a set for this tuning with "diesis samples"`,
  );
}
