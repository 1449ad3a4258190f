import { formatRange, formatSpelledPitch, type NameStyle, type SpelledPitch } from '../pitch/index.js';
import type { Router, RouterEvent } from '../router/router.js';
import { formatChannels } from '../router/setup.js';
import type { ControlledSpeller } from '../spelling/controlled.js';
import type { Style } from '../cli/style.js';
import { signed } from '../cli/table.js';
import type { BridgeNotice } from './bridge.js';
import { matchOf, scoreStatus } from '../score/with-score.js';

interface Sounding {
  readonly pitch: SpelledPitch;
  readonly cents: number;
  readonly hz: number;
  readonly channel: number;
}

export interface ViewSources {
  readonly router: Router;
  readonly speller: ControlledSpeller;
  readonly strategy: string;
  readonly title: string;
  readonly lostMessages: () => number;
  readonly ports: () => { inputs: boolean[]; output: boolean };
}

/**
 * What the player sees: on a terminal a screen redrawn a few times a second (strategy, window,
 * pedals and latches, the notes sounding with their spellings and cents, channels, warnings);
 * elsewhere one line per decision. Pure apart from the clock-free state it keeps.
 */
export class LiveView {
  private readonly sounding = new Map<number, Sounding>();
  private readonly notices: string[] = [];
  private lastPanic = '';

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
    if (e.type === 'note') this.sounding.set(e.source * 2048 + e.inChannel * 128 + e.inKey, { pitch: e.pitch, cents: e.cents, hz: e.hz, channel: e.placement.channel + 1 });
    else if (e.type === 'key-up') this.sounding.delete(e.source * 2048 + e.inChannel * 128 + e.inKey);
    else if (e.type === 'panic') {
      this.sounding.clear();
      this.lastPanic = e.reason;
    }
    const warning = this.warningOf(e);
    if (warning) this.remember(warning);
  }

  /** The line to print for an event when there is no screen to redraw. */
  line(e: RouterEvent): string | undefined {
    if (e.type === 'note') {
      const m = matchOf(this.sources.speller, e.source, e.inChannel, e.inKey);
      return `${this.note(e.pitch).padEnd(5)} key ${String(e.inKey).padStart(3)}  ${signed(e.cents, 2, this.names.accidentals === 'ascii').padStart(8)} c  ${e.hz.toFixed(2).padStart(8)} Hz  → ch ${e.placement.channel + 1} key ${e.placement.key}${m ? `  bar ${m.bar ?? '-'} ${m.match}` : ''}`;
    }
    const warning = this.warningOf(e);
    return warning && this.style.yellow(`! ${warning}`);
  }

  private warningOf(e: RouterEvent): string | undefined {
    switch (e.type) {
      case 'steal':
        return `stole a channel: ${e.voices} note(s) ended to make room`;
      case 'out-of-range':
        return `${this.note(e.pitch)} needs ${e.neededCents.toFixed(1)} cents: more than the bend range`;
      case 'note-dropped':
        return `key ${e.inKey} dropped: ${e.reason}`;
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
    const { router, speller, strategy, title } = this.sources;
    const s = this.style;
    const on = (flag: boolean, label: string): string => (flag ? s.bold(s.green(`[${label}]`)) : s.dim(` ${label} `));
    const ports = this.sources.ports();
    const lines: string[] = [];
    lines.push(s.bold(title));
    const window = formatRange(speller.currentWindow(), this.names);
    lines.push(`spelling ${s.bold(strategy)}  window ${s.bold(window)}${speller.shift ? `  shift ${speller.shift > 0 ? '+' : ''}${speller.shift}` : ''}${router.passing ? s.yellow('  12-ET PASS') : ''}`);
    const following = scoreStatus(speller);
    if (following) lines.push(following.includes('LOST') ? s.yellow(following) : following);
    lines.push(`pedals ${on(router.sustainDown, 'sustain')} ${on(router.sostenutoDown, 'sostenuto')}   latches ${on(speller.flip, 'flip')} ${on(speller.force === 'sharps', 'sharps')} ${on(speller.force === 'flats', 'flats')} ${on(speller.frozen, 'freeze')}`);
    lines.push(`ports  in ${ports.inputs.map((ok, i) => (ok ? s.green(`${i + 1}:ok`) : s.red(`${i + 1}:GONE`))).join(' ')}  out ${ports.output ? s.green('ok') : s.red('GONE')}`);
    lines.push('');
    const notes = [...this.sounding.values()].sort((a, b) => a.hz - b.hz);
    lines.push(s.bold(`sounding (${notes.length})`));
    for (const n of notes.slice(-12)) lines.push(`  ${s.bold(this.note(n.pitch).padEnd(6))} ${signed(n.cents, 1).padStart(7)} c  ${n.hz.toFixed(2).padStart(8)} Hz  ch ${n.channel}`);
    lines.push('');
    const used = router.output.usedChannels();
    lines.push(`channels used ${used.length ? formatChannels(used) : '-'}   busy ${new Set(notes.map((n) => n.channel)).size}`);
    const st = router.stats;
    const counts = [`steals ${router.output.counters.steals}`, `out of range ${st.outOfRange}`, `dropped notes ${st.notesDropped}`, `bad bytes ${st.malformedBytes}`, `lost messages ${this.sources.lostMessages()}`];
    lines.push(counts.join('   '));
    for (const n of this.notices) lines.push(s.yellow(`! ${n}`));
    lines.push(s.dim(`keys: p or space = PANIC, q = quit${this.lastPanic ? `   (last panic: ${this.lastPanic})` : ''}`));
    return lines.join('\n');
  }
}
