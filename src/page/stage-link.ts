import { networkInterfaces } from 'node:os';
import { createRequire } from 'node:module';
import { buildChart } from '../chart/chart.js';
import { chartSvg } from '../chart/chart-svg.js';
import type { TimedMessage } from '../midi/bytes.js';
import { parseFifthsRange } from '../pitch/index.js';
import type { Router, RouterEvent } from '../router/router.js';
import type { ControlledSpeller } from '../spelling/controlled.js';
import { DEFAULT_WOLF_LIMITS, type Reference, type Tuning } from '../tuning/index.js';
import type { BridgeNotice } from '../io/port-notice.js';
import { PAGE_UPDATES_PER_SECOND, PageServer, isLoopback } from './page-server.js';
import { applyStageControl } from './stage-controls.js';
import { lonePiece, StageTracker, stageStateOf, type StageSources } from './stage-view.js';
import type { StageControlResult, StagePiece } from './stage-state.js';

/** What `play --page` and the demo ask for. */
export interface StagePageRequest {
  readonly port: number;
  /** Listen here instead of 127.0.0.1; a token is then required. */
  readonly host?: string | undefined;
  /** When the port is taken, take any free one instead of failing (the demo). */
  readonly anyPortIfTaken?: boolean | undefined;
  readonly pieceTitle: string;
  readonly tuningId: string;
  readonly tuningName: string;
}

/** The session's parts the page reads and acts on. */
export interface StageSessionParts {
  readonly router: Router;
  readonly speller: ControlledSpeller;
  readonly tuning: Tuning;
  readonly reference: Reference;
  readonly strategy: string;
  readonly send: (messages: readonly TimedMessage[]) => void;
  readonly clock: () => number;
  readonly synthConnected: () => boolean;
  /** Moves through a concert programme (the next-piece and previous-piece actions); absent without one. */
  readonly piece?: ((step: 1 | -1) => StageControlResult) | undefined;
}

/** The session's side of the page: hears events and notices, builds and publishes the state while a page is open. */
export interface StageLink {
  readonly server: PageServer;
  /** Lines for the terminal: the address (and a QR code of it when the page is open to the network). */
  readonly banner: string;
  attach(parts: StageSessionParts): void;
  event(e: RouterEvent): void;
  notice(n: BridgeNotice): void;
  stop(): Promise<void>;
}

const require = createRequire(import.meta.url);
const qrcode = require('qrcode-terminal') as { generate(text: string, options: { small: boolean }, done: (qr: string) => void): void };

/** The address as a QR code of terminal characters (qrcode-terminal), for a tablet's camera. */
export function qrText(url: string): string {
  let text = '';
  qrcode.generate(url, { small: true }, (qr) => (text = qr));
  return text;
}

/** Where a tablet on the network can reach a page listening on every address (0.0.0.0). */
function networkUrls(server: PageServer): string[] {
  const urls: string[] = [];
  for (const list of Object.values(networkInterfaces())) {
    for (const a of list ?? []) if (a.family === 'IPv4' && !a.internal) urls.push(server.url.replace('://127.0.0.1:', `://${a.address}:`));
  }
  return urls.length > 0 ? urls : [server.url];
}

function noticeWords(n: BridgeNotice): string {
  if (n.kind === 'send-failed') return `a message could not be sent to the synth: ${n.error}`;
  const what = n.change.type === 'input' ? 'the input' : 'the synth';
  return `${what} "${n.change.name}" was ${n.change.kind === 'connected' ? 'plugged in' : 'unplugged'}: ${n.action}`;
}

/**
 * Starts the stage page for a session. The state is built from the session at most
 * ~30 times a second and only while a page is connected; the MIDI path only hands events to the
 * tracker (a map update).
 */
export async function openStagePage(request: StagePageRequest): Promise<StageLink> {
  const server = new PageServer();
  try {
    await server.start({ host: request.host, port: request.port });
  } catch (error) {
    if (!request.anyPortIfTaken) throw error;
    await server.start({ host: request.host, port: 0 });
  }
  const open = request.host !== undefined && !isLoopback(request.host);
  const urls = open && request.host === '0.0.0.0' ? networkUrls(server) : [server.url];
  const banner = [`stage page: ${urls.join('  ')}${open ? '  (open to the network: the address carries its token)' : ''}`, ...(open ? [qrText(urls[0] ?? server.url)] : [])].join('\n');
  let sources: StageSources | undefined;
  let tracker: StageTracker | undefined;
  let timer: NodeJS.Timeout | undefined;
  const pending: RouterEvent[] = [];
  // A programme's piece and a tuning changed while playing: what the page shows from then on.
  let piece: StagePiece = lonePiece(request.pieceTitle);
  let tuning: Extract<RouterEvent, { type: 'tuning' }> | undefined;
  let strategy: string | undefined;
  const picture = (t: Tuning, reference: Reference, name: string): string =>
    chartSvg(buildChart({ tuning: t, reference, range: parseFifthsRange('Gb..A#'), octave: 4, wolfLimits: DEFAULT_WOLF_LIMITS }), { title: name });
  let drawn: { readonly tuning: Tuning; readonly reference: Reference; readonly svg: string } | undefined;
  /** The sources as they are now: the piece and tuning in force replace those the session began with. */
  const current = (base: StageSources): StageSources => {
    const withPiece = { ...base, piece, strategy: strategy ?? base.strategy };
    if (!tuning) return withPiece;
    const t = tuning;
    if (!drawn || drawn.tuning !== t.tuning || drawn.reference !== t.reference) drawn = { tuning: t.tuning, reference: t.reference, svg: picture(t.tuning, t.reference, t.name) };
    return { ...withPiece, tuning: t.tuning, reference: t.reference, tuningId: t.tuningId, tuningName: t.name, picture: drawn.svg };
  };
  return {
    server,
    banner,
    attach(parts) {
      const router = parts.router;
      tracker = new StageTracker();
      for (const e of pending.splice(0)) tracker.event(e);
      sources = {
        router,
        speller: parts.speller,
        tuning: parts.tuning,
        reference: parts.reference,
        tuningId: request.tuningId,
        tuningName: request.tuningName,
        strategy: parts.strategy,
        piece: lonePiece(request.pieceTitle),
        picture: picture(parts.tuning, parts.reference, request.tuningName),
        synthConnected: parts.synthConnected,
      };
      server.onControl((control) => applyStageControl(control, { speller: parts.speller, router, send: parts.send, clock: parts.clock, piece: parts.piece }));
      const ready = sources;
      const live = tracker;
      timer = setInterval(() => {
        if (server.connections > 0) server.publish(stageStateOf(current(ready), live, parts.clock()));
      }, Math.ceil(1000 / PAGE_UPDATES_PER_SECOND));
    },
    event(e) {
      if (e.type === 'piece') strategy = e.strategy;
      if (e.type === 'piece') piece = { title: e.title, index: e.index, count: e.count, canPrevious: e.index > 0, canNext: e.index < e.count - 1 };
      if (e.type === 'tuning') tuning = e;
      if (tracker) tracker.event(e);
      else pending.push(e);
    },
    notice(n) {
      tracker?.warn(noticeWords(n));
    },
    async stop() {
      if (timer) clearInterval(timer);
      // The page sees the last state (every note ended) before the server goes.
      if (sources && tracker && server.connections > 0) server.publish(stageStateOf(current(sources), tracker, performance.now()));
      await server.stop();
    },
  };
}
