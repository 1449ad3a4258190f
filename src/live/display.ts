import { formatPitchClass, formatRange, formatSpelledPitch, type NameStyle, type SpelledPitch } from '../pitch/index.js';
import { formatReference } from '../tuning/index.js';
import type { RouterEvent } from '../router/events.js';
import type { NoteId } from '../midi/note-id.js';
import { channelOf, keyOfNote, sourceOf } from '../midi/note-id.js';
import type { Tally } from '../router/tally.js';
import type { ControlledSpeller } from '../spelling/controlled.js';
import { formatChannels } from '../text/channels.js';
import type { Style } from '../text/style.js';
import { signed } from '../text/table.js';
import type { BridgeNotice } from './bridge.js';
import { matchOf, scoreStatus } from '../score/score-status.js';

interface Sounding {
  readonly pitch: SpelledPitch;
  readonly cents: number;
  readonly hz: number;
  readonly channel: number;
  /** Its key is up and a pedal holds it. */
  pedal: boolean;
}

export interface PortState {
  readonly name: string;
  readonly connected: boolean;
}

export interface ViewSources {
  readonly speller: ControlledSpeller;
  readonly tally: Tally;
  readonly strategy: string;
  readonly title: string;
  /** Messages that could not be sent to the synth (its port missing or failing). */
  readonly lostMessages: () => number;
  readonly ports: () => { inputs: readonly PortState[]; output: PortState };
}

/**
 * What the player sees: on a terminal a screen redrawn a few times a second (strategy, window,
 * pedals and latches, the notes sounding with their spellings and cents, channels, warnings);
 * elsewhere one line per decision. A fold over the engine's events: it never asks the engine.
 */
export class LiveView {
  private readonly sounding = new Map<NoteId, Sounding>();
  private readonly notices: string[] = [];
  private lastPanic = '';
  private sustain = false;
  private sostenuto = false;
  private passing = false;
  /** The piece of a concert programme and the tuning in force, once either has changed. */
  private pieceNow: string | undefined;
  private tuningNow: string | undefined;
  private strategyNow: string | undefined;

  constructor(
    private readonly sources: ViewSources,
    private readonly style: Style,
    private readonly names: NameStyle,
  ) {}

  private note(pitch: SpelledPitch): string {
    return formatSpelledPitch(pitch, this.names);
  }

  /** Takes an engine event into the state the screen shows. */
  event(e: RouterEvent): void {
    switch (e.type) {
      case 'note':
        this.sounding.set(e.id, { pitch: e.pitch, cents: e.cents, hz: e.hz, channel: e.placement.channel + 1, pedal: false });
        break;
      case 'key-up': {
        const s = this.sounding.get(e.id);
        if (s) s.pedal = true; // still sounding until its voice ends
        break;
      }
      case 'voice-ended':
        this.sounding.delete(e.id);
        break;
      case 'pedal':
        if (e.pedal === 'sustain') this.sustain = e.down;
        else this.sostenuto = e.down;
        break;
      case 'pass':
        this.passing = e.on;
        break;
      case 'piece':
        this.pieceNow = this.pieceWords(e);
        this.strategyNow = e.strategy;
        break;
      case 'tuning':
        this.tuningNow = this.tuningWords(e);
        break;
      case 'output':
        if (e.waiting) this.remember("the piece's output settings wait until nothing sounds");
        break;
      case 'panic':
        this.sounding.clear();
        this.sustain = false;
        this.sostenuto = false;
        this.lastPanic = e.reason;
        break;
    }
    const warning = this.warningOf(e);
    if (warning) this.remember(warning);
  }

  /** The line to print for an event when there is no screen to redraw. */
  line(e: RouterEvent): string | undefined {
    if (e.type === 'note') {
      const instead = e.wanted ? `  (the set has no ${this.note(e.wanted)})` : '';
      const m = matchOf(this.sources.speller, sourceOf(e.id), channelOf(e.id), keyOfNote(e.id));
      return `${this.note(e.pitch).padEnd(5)} key ${String(keyOfNote(e.id)).padStart(3)}  ${signed(e.cents, 2, this.names.accidentals === 'ascii').padStart(8)} c  ${e.hz.toFixed(2).padStart(8)} Hz  → ch ${e.placement.channel + 1} key ${e.placement.key}${instead}${m ? `  bar ${m.bar ?? '-'} ${m.match}` : ''}`;
    }
    if (e.type === 'piece') return this.style.bold(`== ${this.pieceWords(e)}`);
    if (e.type === 'tuning') return this.style.bold(`== ${this.tuningWords(e)}`);
    if (e.type === 'output') return this.style.bold(e.waiting ? "== the piece's output settings wait until nothing sounds" : "== the piece's output settings are in force");
    const warning = this.warningOf(e);
    return warning && this.style.yellow(`! ${warning}`);
  }

  private pieceWords(e: Extract<RouterEvent, { type: 'piece' }>): string {
    return `piece ${e.index + 1} of ${e.count}: ${e.title}`;
  }

  private tuningWords(e: Extract<RouterEvent, { type: 'tuning' }>): string {
    return `new notes in ${e.name} (${e.tuningId}), ${formatReference(e.reference, this.names)}`;
  }

  private warningOf(e: RouterEvent): string | undefined {
    switch (e.type) {
      case 'steal':
        return `stole a channel: ${e.ids.length} note(s) ended to make room`;
      case 'out-of-range':
        return `${this.note(e.pitch)} needs ${e.neededCents.toFixed(1)} cents: more than the output can tune`;
      case 'note-dropped':
        return `${this.note(e.pitch)} dropped: ${e.reason}`;
      case 'panic':
        return `PANIC (${e.reason}): all notes off`;
      default:
        return undefined;
    }
  }

  notice(n: BridgeNotice): string {
    const text = n.kind === 'port' ? `${n.change.type} "${n.change.name}" ${n.change.kind}: ${n.action}` : `could not send: ${n.error}`;
    this.remember(text);
    return this.style.yellow(`! ${text}`);
  }

  private remember(text: string): void {
    this.notices.push(text);
    if (this.notices.length > 4) this.notices.shift();
  }

  /** The whole screen, for a terminal. */
  frame(): string {
    const { speller, title, tally } = this.sources;
    const strategy = this.strategyNow ?? this.sources.strategy;
    const s = this.style;
    const o = speller.overrides;
    const on = (flag: boolean, label: string): string => (flag ? s.bold(s.green(`[${label}]`)) : s.dim(` ${label} `));
    const port = (p: PortState): string => (p.connected ? s.green(p.name) : s.red(`${p.name} (unplugged)`));
    const ports = this.sources.ports();
    const lines: string[] = [];
    lines.push(s.bold(title));
    if (this.pieceNow) lines.push(s.bold(s.green(this.pieceNow)));
    if (this.tuningNow) lines.push(this.tuningNow);
    const window = formatRange(speller.currentWindow(), this.names);
    const key = speller.currentKey();
    const inKey = key ? `  key ${s.bold(`${formatPitchClass(key.tonic, this.names)} ${key.mode}`)}` : '';
    lines.push(`spelling ${s.bold(strategy)}${inKey}  window ${s.bold(window)}${o.shift ? `  shift ${o.shift > 0 ? '+' : ''}${o.shift}` : ''}${this.passing ? s.yellow('  12-ET PASS') : ''}`);
    const following = scoreStatus(speller);
    if (following) lines.push(following.includes('LOST') ? s.yellow(following) : following);
    lines.push(`pedals ${on(this.sustain, 'sustain')} ${on(this.sostenuto, 'sostenuto')}   latches ${on(o.flip, 'flip')} ${on(o.force === 'sharps', 'sharps')} ${on(o.force === 'flats', 'flats')} ${on(o.frozen, 'freeze')}`);
    lines.push(`from ${ports.inputs.map(port).join(', ')}  to ${port(ports.output)}`);
    lines.push('');
    const notes = [...this.sounding.values()].sort((a, b) => a.hz - b.hz);
    lines.push(s.bold(`sounding (${notes.length})`));
    for (const n of notes.slice(-12)) lines.push(`  ${s.bold(this.note(n.pitch).padEnd(6))} ${signed(n.cents, 1).padStart(7)} c  ${n.hz.toFixed(2).padStart(8)} Hz  ch ${n.channel}${n.pedal ? s.dim('  pedal') : ''}`);
    lines.push('');
    const used = tally.channelsUsed();
    lines.push(`channels used ${used.length ? formatChannels(used) : '-'}   busy ${new Set(notes.map((n) => n.channel)).size}`);
    const counts = [
      `steals ${tally.steals}`,
      `out of range ${tally.outOfRange}`,
      `dropped notes ${tally.notesDropped}`,
      `garbled input bytes ${tally.malformedBytes}`,
      `messages the synth missed ${this.sources.lostMessages()}`,
    ];
    if (tally.substitutions) counts.push(`played as another spelling ${tally.substitutions}`);
    lines.push(counts.join('   '));
    for (const n of this.notices) lines.push(s.yellow(`! ${n}`));
    lines.push(s.dim(`keys: p or space = PANIC, q = quit${this.lastPanic ? `   (last panic: ${this.lastPanic})` : ''}`));
    return lines.join('\n');
  }
}
