import { mkdirSync, readdirSync, readFileSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { writeWav } from '../../src/audio/wav.js';
import { writeMidiFile } from '../../src/render/smf.js';
import { runCli } from '../cli/run-cli.js';
import { expectUntouched, snapshot } from '../support/snapshot.js';
import { tempDir } from '../support/temp.js';


/** A player's home: their samples (a sine per key, 12-ET at A4 = 440), their notes, another folder of their own. */
function home(): { home: string; samples: string } {
  const home = tempDir('diesis-home-');
  const samples = join(home, 'harpsichord');
  mkdirSync(samples);
  for (const key of [57, 60, 63, 66, 69]) {
    const hz = 440 * 2 ** ((key - 69) / 12);
    writeFileSync(join(samples, `${key}.wav`), writeWav({ sampleRate: 44_100, channels: [Float32Array.from({ length: 8_820 }, (_, n) => 0.3 * Math.sin((2 * Math.PI * hz * n) / 44_100))] }, 16));
  }
  writeFileSync(join(samples, 'notes.txt'), 'recorded in the church, 2 mics\n');
  mkdirSync(join(home, 'other'));
  writeFileSync(join(home, 'other', 'letter.txt'), 'dear …\n');
  writeFileSync(join(home, 'other', 'take.wav'), writeWav({ sampleRate: 44_100, channels: [new Float32Array(100)] }, 16));
  mkdirSync(join(home, 'foreign-set'));
  writeFileSync(join(home, 'foreign-set', 'manifest.json'), JSON.stringify({ hello: 'a manifest of another program' }));
  writeFileSync(join(home, 'a-file'), 'just a file\n');
  symlinkSync(samples, join(home, 'link-to-harpsichord'));
  return { home, samples };
}

const build = (from: string, to: string, ...extra: string[]) => runCli('samples', '--from', from, '--to', to, '--compass', '57-69', '-t', 'werckmeister-3', ...extra);

describe('diesis samples never destroys what diesis did not write', () => {
  const { home: dir, samples } = home();
  const before = snapshot(dir);

  it.each([
    ['the source itself', () => samples, 2, /--to .*harpsichord is the --from folder: diesis never writes over your samples/u],
    ['the source through a link', () => join(dir, 'link-to-harpsichord'), 2, /is the --from folder/u],
    ['a folder inside the source', () => join(samples, 'set'), 2, /--to .*harpsichord\/set is inside the --from folder/u],
    ['the folder holding the source', () => dir, 2, /--to .* contains the --from folder/u],
    ['a folder of the player’s own files', () => join(dir, 'other'), 1, /--to .*other already holds 2 entries \(letter\.txt, take\.wav\) and is not a sample set diesis built/u],
    ['a folder with another program’s manifest', () => join(dir, 'foreign-set'), 1, /--to .*foreign-set holds a manifest\.json diesis cannot read as its own/u],
    ['a file', () => join(dir, 'a-file'), 1, /--to .*a-file is a file, not a folder/u],
    ['a folder inside a missing one', () => join(dir, 'no', 'such'), 1, /no such folder/u],
  ])('refuses --to %s in one line, and every file stays', async (_name, to, code, message) => {
    const result = await build(samples, to());
    expect(result.code).toBe(code);
    expect(result.stderr).toMatch(message);
    expect(result.stderr.trim().split('\n')).toHaveLength(1);
    expectUntouched(dir, before);
  });

  it('builds into an empty folder, and rebuilds a set it made, replacing exactly that set’s files', async () => {
    const target = join(dir, 'sets', 'meantone');
    mkdirSync(target, { recursive: true });
    expect((await build(samples, target)).code).toBe(0);
    const first = JSON.parse(readFileSync(join(target, 'manifest.json'), 'utf8')) as { builtBy: string; files: Array<{ file: string }>; tuningId: string; reference: string };
    expect(first).toMatchObject({ builtBy: 'diesis', tuningId: 'werckmeister-3', reference: 'A4=440' });
    writeFileSync(join(target, 'my-notes.txt'), 'the player put this here\n');
    const rebuilt = await runCli('samples', '--from', samples, '--to', target, '--compass', '60-63', '-t', 'werckmeister-3');
    expect(rebuilt.code).toBe(0);
    const second = JSON.parse(readFileSync(join(target, 'manifest.json'), 'utf8')) as { files: Array<{ file: string }> };
    expect(readdirSync(target).sort()).toEqual(['diesis.sfz', 'manifest.json', 'my-notes.txt', ...second.files.map((f) => f.file)].sort());
    expect(second.files.length).toBeLessThan(first.files.length);
    expect(readFileSync(join(target, 'my-notes.txt'), 'utf8')).toBe('the player put this here\n');
    expect(readdirSync(join(dir, 'sets'))).toEqual(['meantone']); // no temporary folder left beside it
    for (const [name, bytes] of before) expect(snapshot(dir).get(name)?.equals(bytes), name).toBe(true);
  });
});

describe('a sample set plays as it was built', () => {
  const { samples } = home();
  const set = join(tempDir('diesis-sets-'), 'wm3');
  const piece = join(tempDir('diesis-piece-'), 'two.mid');
  writeFileSync(piece, writeMidiFile({ ticksPerBeat: 480 }, [], [[{ tick: 0, data: [0x90, 60, 90] }, { tick: 240, data: [0x80, 60, 0] }]]));
  const wav = (): string => join(tempDir('diesis-wav-'), 'out.wav');

  it('records its tuning and reference, and plays in them by default', async () => {
    expect((await build(samples, set, '--ref', 'A4=415')).code).toBe(0);
    const result = await runCli('render', piece, '--wav', wav(), '--sample-set', set);
    expect(result.stderr).toBe('');
    expect(result.stdout).toMatch(/Werckmeister III at A4=415 Hz, samples/u);
  });

  it.each([
    ['another tuning', ['-t', 'meantone-1-4', '--ref', 'A4=415'], 1, /--sample-set .*wm3 was built for Werckmeister III at A4=415 Hz, not 1\/4-comma meantone at A4=415 Hz \(its \S+ would be [\d.]+ cents off\): play it with -t werckmeister-3 --ref A4=415/u],
    ['another reference', ['-t', 'werckmeister-3', '--ref', 'A4=440'], 1, /was built for Werckmeister III at A4=415 Hz, not Werckmeister III at A4=440 Hz/u],
    ['another mode', ['--mode', 'bend'], 2, /--sample-set .*wm3 is played by --mode samples \(it was built for Werckmeister III at A4=415 Hz\); drop --mode bend/u],
  ])('refuses %s, saying what the set was built for', async (_name, extra, code, message) => {
    const result = await runCli('render', piece, '--wav', wav(), '--sample-set', set, ...extra);
    expect(result.code).toBe(code);
    expect(result.stderr).toMatch(message);
  });

  it('validates the manifest when it reads it: a file name may not leave the folder', async () => {
    const manifest = JSON.parse(readFileSync(join(set, 'manifest.json'), 'utf8')) as { files: Array<{ file: string }> };
    manifest.files[0]!.file = '../../elsewhere.wav';
    const broken = join(tempDir('diesis-broken-'), 'set');
    mkdirSync(broken);
    writeFileSync(join(broken, 'manifest.json'), JSON.stringify(manifest));
    const result = await runCli('render', piece, '--wav', wav(), '--sample-set', broken);
    expect(result.code).toBe(1);
    expect(result.stderr).toMatch(/manifest\.json: not a sample-set manifest: \$\.files\[0\]\.file: must be a plain file name/u);
  });
});

describe('the range of a set', () => {
  const { samples } = home();

  it('defaults to 16 spellings when the tuning tells G♯ from A♭, 12 when it does not', async () => {
    const meantone = await runCli('samples', '--from', samples, '--to', join(tempDir('diesis-r-'), 's'), '--compass', '60-64', '-t', 'meantone-1-4', '--spelling', 'key', '--key', 'C major');
    expect(meantone.stdout).toMatch(/range Db\.\.A#; channels: 1 Db, 2 Ab, .* 16 A#/u);
    expect(meantone.stderr).toBe(''); // C major's window Eb..G# lies inside Db..A#
    const wm3 = await runCli('samples', '--from', samples, '--to', join(tempDir('diesis-r-'), 's'), '--compass', '60-64', '-t', 'werckmeister-3');
    expect(wm3.stdout).toMatch(/range Eb\.\.G#; channels: 1 Eb, .* 12 G#/u);
    expect(wm3.stderr).toBe(''); // a well temperament: every missing spelling has the pitch of one the set holds
  });

  it('warns when the range cannot hold what the spelling strategy can give', async () => {
    const follow = await runCli('samples', '--from', samples, '--to', join(tempDir('diesis-r-'), 's'), '--compass', '60-64', '-t', 'meantone-1-4', '--range', 'Eb..G#');
    expect(follow.code).toBe(0);
    // follow takes keys of up to seven sharps or flats: C♭ major's window begins at its lowered 3rd E𝄫,
    // A♯ minor's ends at its raised 4th D𝄪 (the windows of src/spelling/keys.ts, from the corpus).
    // The default strategy's reach is only a note; a strategy the player chose gets a warning.
    expect(follow.stderr).toBe("diesis: note: the set holds Eb..G#, but --spelling follow can give Ebb..D##: a spelling outside the set plays the set's other spelling of its key, at that spelling's pitch\n");
    const chosen = await runCli('samples', '--from', samples, '--to', join(tempDir('diesis-r-'), 's'), '--compass', '60-64', '-t', 'meantone-1-4', '--range', 'Eb..G#', '--spelling', 'follow');
    expect(chosen.stderr).toMatch(/^diesis: warning: the set holds Eb\.\.G#, but --spelling follow can give/u);
    const eminor = await runCli('samples', '--from', samples, '--to', join(tempDir('diesis-r-'), 's'), '--compass', '60-64', '-t', 'meantone-1-4', '--range', 'Eb..G#', '--spelling', 'key', '--key', 'E minor');
    expect(eminor.stderr).toMatch(/the set holds Eb\.\.G#, but --spelling key can give F\.\.A#/u); // E minor: lowered 2nd F to raised 4th A♯
    const inside = await runCli('samples', '--from', samples, '--to', join(tempDir('diesis-r-'), 's'), '--compass', '60-64', '-t', 'meantone-1-4', '--range', 'Eb..G#', '--spelling', 'key', '--key', 'D minor');
    expect(inside.stderr).toBe(''); // D minor: E♭..G♯ exactly
  });
});
