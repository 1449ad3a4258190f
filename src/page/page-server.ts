import { randomBytes, timingSafeEqual } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import { isIP, type Socket } from 'node:net';
import { join } from 'node:path';
import { WebSocketServer, type WebSocket } from 'ws';
import { packageRoot } from '../util/package-root.js';
import { UserError } from '../util/errors.js';
import { parseStageControl, type StageControl, type StageControlResult, type StageState } from './stage-state.js';

/** The port the page takes when none is given. */
export const DEFAULT_PAGE_PORT = 8421;
/** At most this many updates a second go to the page; the latest state wins. */
export const PAGE_UPDATES_PER_SECOND = 30;
const FRAME_MS = Math.ceil(1000 / PAGE_UPDATES_PER_SECOND);
/** A page that has this much unsent is skipped for a frame (a slow tablet never holds anything up). */
const SLOW_CLIENT_BYTES = 1 << 20;
const COOKIE = 'diesis_page';

export interface PageServerStart {
  /** The address to listen on; 127.0.0.1 (this computer only) unless told otherwise. */
  readonly host?: string | undefined;
  /** 0 takes any free port. */
  readonly port?: number | undefined;
  /**
   * The token a page must show. Off this computer one is always required: when none is given a
   * random one is made. On a loopback address none is needed unless one is given.
   */
  readonly token?: string | undefined;
}

export type ControlHandler = (control: StageControl) => StageControlResult;

/** What travels to the page. */
type ToPage =
  | { readonly type: 'state'; readonly state: Omit<StageState, 'tuning'> & { tuning: Omit<StageState['tuning'], 'picture'> } }
  | { readonly type: 'picture'; readonly svg: string }
  | { readonly type: 'result'; readonly id: unknown; readonly result: StageControlResult };

/** The page's own files, read once from the package (nothing is fetched from anywhere else). */
const ASSETS: Readonly<Record<string, { file: string; type: string }>> = {
  '/': { file: 'index.html', type: 'text/html; charset=utf-8' },
  '/stage.css': { file: 'stage.css', type: 'text/css; charset=utf-8' },
  '/stage.js': { file: 'stage.js', type: 'text/javascript; charset=utf-8' },
};

/** Everything from this server, nothing from elsewhere, no inline script. */
const SECURITY_HEADERS = {
  'content-security-policy': "default-src 'none'; script-src 'self'; style-src 'self'; img-src 'self' data:; connect-src 'self'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'",
  'x-content-type-options': 'nosniff',
  'referrer-policy': 'no-referrer',
  'cache-control': 'no-store',
} as const;

export function isLoopback(host: string): boolean {
  return host === 'localhost' || host === '::1' || /^127\.\d{1,3}\.\d{1,3}\.\d{1,3}$/u.test(host);
}

function sameSecret(given: string | null | undefined, token: string): boolean {
  if (typeof given !== 'string') return false;
  const a = Buffer.from(given);
  const b = Buffer.from(token);
  return a.length === b.length && timingSafeEqual(a, b);
}

function cookieToken(req: IncomingMessage): string | undefined {
  for (const part of (req.headers.cookie ?? '').split(';')) {
    const [name, ...rest] = part.trim().split('=');
    if (name === COOKIE) return rest.join('=');
  }
  return undefined;
}

/**
 * The stage page's server: Node's http for the page's three files and `ws` for the live state and
 * the controls. `publish` only stores the state and arms a timer: the caller (the MIDI path) never
 * waits on a page, and at most ~30 frames a second go out, each the latest state. Nothing it
 * serves or hears can read or change a file: the files are read once at start, and a control is
 * only handed to the `onControl` callback.
 */
export class PageServer {
  private http: Server | undefined;
  private wss: WebSocketServer | undefined;
  private readonly clients = new Set<WebSocket>();
  private readonly sockets = new Set<Socket>();
  private assets = new Map<string, { body: Buffer; type: string }>();
  private latest: StageState | undefined;
  private sentState = '';
  /** The picture each page has now (sent only when it changes). */
  private readonly pictures = new WeakMap<WebSocket, string>();
  private timer: NodeJS.Timeout | undefined;
  private lastFrame = 0;
  private handler: ControlHandler = () => ({ ok: false, reason: 'nothing listens to controls' });
  private address = { host: '127.0.0.1', port: 0 };
  private secret: string | undefined;
  private heartbeat: NodeJS.Timeout | undefined;
  private readonly alive = new WeakSet<WebSocket>();

  /** The token a page must show, or undefined when none is needed (this computer only). */
  get token(): string | undefined {
    return this.secret;
  }

  get port(): number {
    return this.address.port;
  }

  /** The address to open, token included. */
  get url(): string {
    const host = isIP(this.address.host) === 6 ? `[${this.address.host}]` : this.address.host === '0.0.0.0' ? '127.0.0.1' : this.address.host;
    return `http://${host}:${this.address.port}/${this.secret ? `?token=${this.secret}` : ''}`;
  }

  /** Pages connected now. */
  get connections(): number {
    return this.clients.size;
  }

  async start(options: PageServerStart = {}): Promise<void> {
    if (this.http) throw new Error('the page server is already running');
    const host = options.host ?? '127.0.0.1';
    this.secret = options.token ?? (isLoopback(host) ? undefined : randomBytes(18).toString('base64url'));
    const dir = join(packageRoot(), 'page');
    this.assets = new Map(Object.entries(ASSETS).map(([path, a]) => [path, { body: readFileSync(join(dir, a.file)), type: a.type }]));
    const http = createServer((req, res) => this.request(req, res));
    http.on('connection', (socket) => {
      this.sockets.add(socket);
      socket.once('close', () => this.sockets.delete(socket));
    });
    const wss = new WebSocketServer({ noServer: true, maxPayload: 4096 });
    http.on('upgrade', (req: IncomingMessage, socket: Socket, head: Buffer) => this.upgrade(req, socket, head));
    wss.on('connection', (ws) => this.connected(ws));
    await new Promise<void>((resolve, reject) => {
      http.once('error', (error: NodeJS.ErrnoException) =>
        reject(
          error.code === 'EADDRINUSE'
            ? new UserError(`the page cannot use port ${options.port ?? DEFAULT_PAGE_PORT} on ${host}: it is taken (give another with --page PORT)`)
            : error.code === 'EADDRNOTAVAIL'
              ? new UserError(`--page-host ${host}: this computer has no such address`)
              : new UserError(`the page cannot listen on ${host}: ${error.message}`),
        ),
      );
      http.listen(options.port ?? DEFAULT_PAGE_PORT, host, () => resolve());
    });
    const bound = http.address();
    this.address = { host, port: typeof bound === 'object' && bound ? bound.port : 0 };
    this.http = http;
    this.wss = wss;
    this.heartbeat = setInterval(() => this.beat(), 10_000);
    this.heartbeat.unref();
  }

  onControl(handler: ControlHandler): void {
    this.handler = handler;
  }

  /** Stores the state for the next frame; returns at once. */
  publish(state: StageState): void {
    this.latest = state;
    if (this.timer || !this.http) return;
    const wait = Math.max(0, this.lastFrame + FRAME_MS - performance.now());
    this.timer = setTimeout(() => this.frame(), wait);
  }

  /** Sends the last state published (if a frame is pending), then closes every page and the server. */
  async stop(): Promise<void> {
    if (this.timer) {
      clearTimeout(this.timer);
      this.frame();
    }
    if (this.heartbeat) clearInterval(this.heartbeat);
    for (const ws of this.clients) ws.close(1001, 'diesis stopped');
    const http = this.http;
    const wss = this.wss;
    this.http = undefined;
    this.wss = undefined;
    await new Promise<void>((resolve) => (wss ? wss.close(() => resolve()) : resolve()));
    if (http) {
      const closed = new Promise<void>((resolve) => http.close(() => resolve()));
      for (const ws of this.clients) ws.terminate();
      for (const socket of this.sockets) socket.destroy();
      await closed;
    }
    this.clients.clear();
  }

  private frame(): void {
    this.timer = undefined;
    this.lastFrame = performance.now();
    const state = this.latest;
    if (!state || this.clients.size === 0) return;
    this.sendPicture(state);
    const text = JSON.stringify({ type: 'state', state: withoutPicture(state) } satisfies ToPage);
    if (text === this.sentState) return;
    this.sentState = text;
    this.broadcast(text);
  }

  private sendPicture(state: StageState, only?: WebSocket): void {
    const picture = state.tuning.picture;
    if (picture === undefined) return;
    let text: string | undefined;
    for (const ws of only ? [only] : this.clients) {
      if (this.pictures.get(ws) === picture || ws.readyState !== ws.OPEN) continue;
      text ??= JSON.stringify({ type: 'picture', svg: picture } satisfies ToPage);
      ws.send(text);
      this.pictures.set(ws, picture);
    }
  }

  private broadcast(text: string): void {
    for (const ws of this.clients) if (ws.readyState === ws.OPEN && ws.bufferedAmount < SLOW_CLIENT_BYTES) ws.send(text);
  }

  private beat(): void {
    for (const ws of this.clients) {
      if (!this.alive.has(ws)) {
        ws.terminate();
        continue;
      }
      this.alive.delete(ws);
      ws.ping();
    }
  }

  /** Whether the request names this server as its host (a loopback page refuses other names: no DNS rebinding). */
  private hostAllowed(req: IncomingMessage): boolean {
    if (this.secret) return true;
    const host = req.headers.host ?? '';
    const port = `:${this.address.port}`;
    return [`127.0.0.1${port}`, `localhost${port}`, `[::1]${port}`].includes(host) || (isLoopback(this.address.host) && host === `${this.address.host}${port}`);
  }

  private tokenShown(req: IncomingMessage, url: URL): boolean {
    if (!this.secret) return true;
    return sameSecret(url.searchParams.get('token'), this.secret) || sameSecret(cookieToken(req), this.secret);
  }

  private request(req: IncomingMessage, res: ServerResponse): void {
    const refuse = (status: number, text: string): void => {
      res.writeHead(status, { 'content-type': 'text/plain; charset=utf-8', ...SECURITY_HEADERS });
      res.end(`${text}\n`);
    };
    if (req.method !== 'GET' && req.method !== 'HEAD') return refuse(405, 'the stage page only reads');
    if (!this.hostAllowed(req)) return refuse(421, 'not this page’s address');
    const url = new URL(req.url ?? '/', 'http://page.invalid');
    if (!this.tokenShown(req, url)) return refuse(403, 'this page needs the address with its token, as diesis printed it');
    const asset = this.assets.get(url.pathname);
    if (!asset) return refuse(404, 'no such page');
    const headers: Record<string, string> = { 'content-type': asset.type, ...SECURITY_HEADERS };
    if (this.secret) headers['set-cookie'] = `${COOKIE}=${this.secret}; HttpOnly; SameSite=Strict; Path=/`;
    res.writeHead(200, headers);
    res.end(req.method === 'HEAD' ? undefined : asset.body);
  }

  private upgrade(req: IncomingMessage, socket: Socket, head: Buffer): void {
    const refuse = (status: string): void => {
      socket.end(`HTTP/1.1 ${status}\r\nConnection: close\r\nContent-Length: 0\r\n\r\n`);
      socket.destroy();
    };
    const url = new URL(req.url ?? '/', 'http://page.invalid');
    if (url.pathname !== '/live' || !this.wss) return refuse('404 Not Found');
    if (!this.hostAllowed(req)) return refuse('421 Misdirected Request');
    // Only this page may connect: a page from any other origin (a web site open in another tab) is refused.
    if (req.headers.origin !== `http://${req.headers.host ?? ''}`) return refuse('403 Forbidden');
    if (!this.tokenShown(req, url)) return refuse('403 Forbidden');
    this.wss.handleUpgrade(req, socket, head, (ws) => this.wss?.emit('connection', ws, req));
  }

  private connected(ws: WebSocket): void {
    this.clients.add(ws);
    this.alive.add(ws);
    ws.on('pong', () => this.alive.add(ws));
    ws.on('close', () => this.clients.delete(ws));
    ws.on('error', () => this.clients.delete(ws));
    ws.on('message', (data, isBinary) => this.message(ws, isBinary ? '' : String(data)));
    const state = this.latest;
    if (state) {
      this.sendPicture(state, ws);
      ws.send(JSON.stringify({ type: 'state', state: withoutPicture(state) } satisfies ToPage));
    }
  }

  private message(ws: WebSocket, text: string): void {
    let request: unknown;
    try {
      request = JSON.parse(text);
    } catch {
      return;
    }
    if (typeof request !== 'object' || request === null) return;
    const { id, control, token } = request as { id?: unknown; control?: unknown; token?: unknown };
    const reply = (result: StageControlResult): void => ws.send(JSON.stringify({ type: 'result', id: typeof id === 'number' ? id : null, result } satisfies ToPage));
    if (this.secret && !sameSecret(typeof token === 'string' ? token : undefined, this.secret)) return reply({ ok: false, reason: 'this control needs the page’s token' });
    const parsed = parseStageControl(control);
    if (typeof parsed === 'string') return reply({ ok: false, reason: parsed });
    let result: StageControlResult;
    try {
      result = this.handler(parsed);
    } catch (error) {
      result = { ok: false, reason: error instanceof Error ? error.message : String(error) };
    }
    reply(result);
  }
}

function withoutPicture(state: StageState): Omit<StageState, 'tuning'> & { tuning: Omit<StageState['tuning'], 'picture'> } {
  const { picture: _picture, ...tuning } = state.tuning;
  return { ...state, tuning };
}
