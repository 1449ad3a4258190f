import { existsSync, mkdirSync, readdirSync, readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { basename, join } from 'node:path';
import { alterationOf, chromaOf, formatPitchClass, formatSpelledPitch, keyOf, letterOf, onKey, parseSpelledPitch, rangeClasses, type FifthsRange, type PitchClass } from '../pitch/index.js';
import { formatReference, frequency, type Reference, type Tuning } from '../tuning/index.js';
import { UserError } from '../util/errors.js';
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
 * (`{ "file.wav": { "key": 60, "hz": 261.4 } }`, `hz` optional), else from its name — a note
 * with octave (`harpsichord-C4.wav`, `Bb3.wav`, `F#5 soft.wav`) or a key number (`060.wav`,
 * `key60.wav`) — else from the file's own `smpl` chunk. A sample is taken to sound its root key
 * in 12-ET at A4 = 440 Hz unless the map gives its frequency.
 */
export function readSourceFolder(dir: string): SourceSample[] {
  if (!existsSync(dir)) throw new UserError(`${dir}: no such folder`);
  const mapFile = join(dir, 'map.json');
  let map: Record<string, { key?: number; hz?: number }> = {};
  if (existsSync(mapFile)) {
    try {
      map = JSON.parse(readFileSync(mapFile, 'utf8')) as typeof map;
    } catch (error) {
      throw new UserError(`${mapFile}: not valid JSON (${error instanceof Error ? error.message : String(error)})`);
    }
  }
  const files = readdirSync(dir).filter((f) => /\.wav$/iu.test(f)).sort();
  if (files.length === 0) throw new UserError(`${dir}: no .wav files`);
  return files.map((f) => {
    const path = join(dir, f);
    const audio = readWav(readFileSync(path), path);
    const entry = map[f];
    const rootKey = entry?.key ?? keyFromName(f) ?? audio.rootKey;
    if (rootKey === undefined || rootKey < 0 || rootKey > 127) {
      throw new UserError(`${path}: no root key: name it after its note (C4.wav, 060.wav), add it to map.json, or give the WAV a smpl chunk`);
    }
    return { file: path, audio, rootKey, hz: entry?.hz ?? 440 * 2 ** ((rootKey - 69) / 12) };
  });
}

/** The root key in a file name: a note with octave, or a key number. */
export function keyFromName(file: string): number | undefined {
  const stem = basename(file).replace(/\.wav$/iu, '');
  const note = /(?:^|[^A-Za-z])([A-G](?:#|b|s)?)(-?\d)(?!\d)/u.exec(stem);
  if (note) {
    const name = `${note[1]!.replace(/s$/u, '#')}${note[2]}`;
    try {
      return keyOf(parseSpelledPitch(name));
    } catch {
      return undefined;
    }
  }
  const number = /(?:^|key|[^0-9])(\d{1,3})$/iu.exec(stem);
  return number ? Number(number[1]) : undefined;
}

export interface SampleSetRequest {
  readonly sources: readonly SourceSample[];
  readonly tuning: Tuning;
  readonly tuningName: string;
  readonly reference: Reference;
  /** The spellings to build, a stretch of the line of fifths (at most 16: one channel each). */
  readonly range: FifthsRange;
  /** The instrument's compass, lowest and highest key. */
  readonly compass: { readonly low: number; readonly high: number };
  /** Refuse to shift a sample more than this many semitones. */
  readonly maxShift: number;
}

export interface ManifestFile {
  readonly file: string;
  readonly spelling: string;
  readonly key: number;
  readonly channel: number;
  readonly hz: number;
  readonly source: string;
  readonly shiftCents: number;
}

export interface Manifest {
  readonly tuning: string;
  readonly reference: string;
  readonly sampleRate: number;
  /** Spelling class → MIDI channel 1…16. */
  readonly layout: ReadonlyArray<{ readonly spelling: string; readonly fifths: number; readonly channel: number }>;
  readonly files: readonly ManifestFile[];
}

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
  const temporary = `${outDir}.tmp-${process.pid}`;
  rmSync(temporary, { recursive: true, force: true });
  mkdirSync(temporary, { recursive: true });
  try {
    const files: ManifestFile[] = [];
    plans.forEach((plan, i) => {
      const ratio = plan.hz / plan.source.hz;
      const audio = plan.source.audio;
      const loop = audio.loop && { start: Math.round(audio.loop.start / ratio), end: Math.round(audio.loop.end / ratio) };
      const out: Audio = { sampleRate: audio.sampleRate, channels: audio.channels.map((c) => resample(c, ratio)), loop, rootKey: plan.key };
      const name = `${fileStem(plan.pitch, plan.pitch.octave)}.wav`;
      writeFileSync(join(temporary, name), writeWav(out, 24));
      files.push({ file: name, spelling: formatSpelledPitch(plan.pitch), key: plan.key, channel: plan.channel + 1, hz: plan.hz, source: basename(plan.source.file), shiftCents: plan.shift * 100 });
      onProgress?.((i + 1) / plans.length);
    });
    const manifest: Manifest = {
      tuning: request.tuningName,
      reference: formatReference(request.reference),
      sampleRate: [...rates][0] ?? 44_100,
      layout: classes.map((pc, channel) => ({ spelling: formatPitchClass(pc), fifths: pc.fifths, channel: channel + 1 })),
      files,
    };
    writeFileSync(join(temporary, 'manifest.json'), JSON.stringify(manifest, null, 2) + '\n');
    writeFileSync(join(temporary, 'diesis.sfz'), sfzText(manifest, plans.map((p) => p.source.audio.loop !== undefined)));
    rmSync(outDir, { recursive: true, force: true });
    renameSync(temporary, outDir);
    return manifest;
  } catch (error) {
    rmSync(temporary, { recursive: true, force: true });
    throw error;
  }
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
  const file = join(dir, 'manifest.json');
  if (!existsSync(file)) throw new UserError(`${dir}: not a sample set (no manifest.json; make one with "diesis samples")`);
  let manifest: Manifest;
  try {
    manifest = JSON.parse(readFileSync(file, 'utf8')) as Manifest;
  } catch (error) {
    throw new UserError(`${file}: not valid JSON (${error instanceof Error ? error.message : String(error)})`);
  }
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
        audio = readWav(readFileSync(join(dir, name)), join(dir, name));
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
