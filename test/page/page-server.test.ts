import { request } from 'node:http';
import { networkInterfaces } from 'node:os';
import { afterEach, describe, expect, it } from 'vitest';
import WebSocket from 'ws';
import { PageServer } from '../../src/page/page-server.js';
import { parseStageControl, type StageControl, type StageState } from '../../src/page/stage-state.js';

/** An address of this machine that is not loopback (the one a tablet on the network would use). */
const lanAddress = Object.values(networkInterfaces())
  .flat()
  .find((a) => a && a.family === 'IPv4' && !a.internal)?.address;

function state(title: string, picture = '<svg xmlns="http://www.w3.org/2000/svg"/>'): StageState {
  return {
    piece: { title, index: 0, count: 1, canPrevious: false, canNext: false },
    tuning: { id: 'meantone-1-4', name: '1/4-comma meantone', picture },
    reference: 'A4 = 415 Hz',
    strategy: 'key',
    key: 'D',
    window: 'E♭..G♯',
    keys: [],
    sounding: [],
    pedals: { sustain: false, sostenuto: false },
    latches: { flip: false, freeze: false, force: null, shift: 0 },
    bar: null,
    warnings: [],
    passing: false,
    synthConnected: true,
  };
}

interface Reply {
  status: number | undefined;
  body: string;
  headers: Record<string, string | string[] | undefined>;
}

function get(host: string, port: number, path: string, headers: Record<string, string> = {}, method = 'GET'): Promise<Reply> {
  return new Promise((resolve, reject) => {
    const req = request({ host, port, path, method, headers }, (res) => {
      let body = '';
      res.on('data', (c: Buffer) => (body += c.toString()));
      res.on('end', () => resolve({ status: res.statusCode, body, headers: res.headers }));
    });
    req.on('error', reject);
    req.end();
  });
}

/** Opens a WebSocket as a browser page would (with an Origin); resolves with the socket or the refusal's status. */
function socket(url: string, origin: string | undefined): Promise<{ ws: WebSocket; messages: Array<{ type: string; [k: string]: unknown }> } | { refused: number }> {
  return new Promise((resolve, reject) => {
    const ws = new WebSocket(url, origin === undefined ? {} : { origin });
    const messages: Array<{ type: string; [k: string]: unknown }> = [];
    ws.on('message', (data) => messages.push(JSON.parse(String(data)) as { type: string }));
    ws.on('open', () => resolve({ ws, messages }));
    ws.on('unexpected-response', (_req, res) => resolve({ refused: res.statusCode ?? 0 }));
    ws.on('error', (error) => reject(error));
  });
}

const wait = (ms: number) => new Promise((r) => setTimeout(r, ms));
async function until(condition: () => boolean, ms = 3000): Promise<void> {
  const end = Date.now() + ms;
  while (!condition()) {
    if (Date.now() > end) throw new Error('timed out waiting');
    await wait(5);
  }
}

const servers: PageServer[] = [];
async function serve(options: { host?: string; token?: string } = {}): Promise<PageServer> {
  const server = new PageServer();
  await server.start({ port: 0, ...options });
  servers.push(server);
  return server;
}
afterEach(async () => {
  for (const s of servers.splice(0)) await s.stop();
});

describe('the stage page server, on this computer only (the default)', () => {
  it('serves its own page, style and script, and nothing else', async () => {
    const server = await serve();
    expect(server.token).toBeUndefined();
    const page = await get('127.0.0.1', server.port, '/');
    expect(page.status).toBe(200);
    expect(page.headers['content-type']).toBe('text/html; charset=utf-8');
    expect(page.body).toContain('id="panic"');
    expect(page.headers['content-security-policy']).toContain("default-src 'none'");
    // Every asset the page names is served by this server (no CDN): stylesheet and script are relative paths.
    for (const path of ['/stage.css', '/stage.js']) expect((await get('127.0.0.1', server.port, path)).status, path).toBe(200);
    expect(page.body).not.toMatch(/(src|href)="(https?:)?\/\//u);
    expect((await get('127.0.0.1', server.port, '/../package.json')).status).toBe(404);
    expect((await get('127.0.0.1', server.port, '/page/stage.js')).status).toBe(404);
    // Nothing on the page can change anything: only reading is allowed.
    for (const method of ['POST', 'PUT', 'DELETE']) expect((await get('127.0.0.1', server.port, '/', {}, method)).status, method).toBe(405);
  });

  it('is not reachable on this machine’s network address', async () => {
    expect(lanAddress, 'this machine has a network address to try').toBeDefined();
    const server = await serve();
    await expect(get(lanAddress!, server.port, '/')).rejects.toThrow(/ECONNREFUSED/u);
  });

  it('refuses a request that names another host (a web site re-pointing its name at this computer)', async () => {
    const server = await serve();
    expect((await get('127.0.0.1', server.port, '/', { host: `attacker.example:${server.port}` })).status).toBe(421);
    expect((await get('127.0.0.1', server.port, '/', { host: `localhost:${server.port}` })).status).toBe(200);
  });

  it('refuses a WebSocket from another origin, accepts the page’s own', async () => {
    const server = await serve();
    const url = `ws://127.0.0.1:${server.port}/live`;
    expect(await socket(url, 'http://attacker.example')).toEqual({ refused: 403 });
    expect(await socket(url, `http://127.0.0.1:${server.port + 1}`)).toEqual({ refused: 403 });
    expect(await socket(url, undefined)).toEqual({ refused: 403 });
    const ok = await socket(url, `http://127.0.0.1:${server.port}`);
    expect('ws' in ok).toBe(true);
    if ('ws' in ok) ok.ws.close();
  });

  it('sends at most a frame per 33 ms, the latest state winning, and the picture only when it changes', async () => {
    const server = await serve();
    server.publish(state('first'));
    const open = await socket(`ws://127.0.0.1:${server.port}/live`, `http://127.0.0.1:${server.port}`);
    if (!('ws' in open)) throw new Error('refused');
    await until(() => open.messages.length >= 2);
    expect(open.messages.slice(0, 2).map((m) => m.type)).toEqual(['picture', 'state']); // on connecting: what there is now
    for (let i = 0; i < 500; i++) server.publish(state(`take ${i}`));
    await until(() => open.messages.some((m) => m.type === 'state' && (m['state'] as StageState).piece.title === 'take 499'));
    await wait(100);
    const states = open.messages.slice(open.messages.findIndex((m) => m.type === 'state' && (m['state'] as StageState).piece.title !== 'first')).filter((m) => m.type === 'state');
    expect(states.length).toBeLessThanOrEqual(2); // 500 publications in one turn of the loop: one or two frames
    expect((states[states.length - 1]!['state'] as StageState).piece.title).toBe('take 499');
    expect(open.messages.slice(2).filter((m) => m.type === 'picture')).toEqual([]); // the same picture is not sent again
    expect((states[0]!['state'] as { tuning: Record<string, unknown> }).tuning['picture']).toBeUndefined();
    server.publish(state('new tuning', '<svg xmlns="http://www.w3.org/2000/svg"><title>other</title></svg>'));
    await until(() => open.messages.filter((m) => m.type === 'picture').length === 2);
    open.ws.close();
  });

  it('hands typed controls to the callback and answers each; refuses malformed ones', async () => {
    const server = await serve();
    const heard: StageControl[] = [];
    server.onControl((c) => {
      heard.push(c);
      return c.kind === 'piece' ? { ok: false, reason: 'no programme' } : { ok: true };
    });
    const open = await socket(`ws://127.0.0.1:${server.port}/live`, `http://127.0.0.1:${server.port}`);
    if (!('ws' in open)) throw new Error('refused');
    open.ws.send(JSON.stringify({ id: 1, control: { kind: 'flip', on: true } }));
    open.ws.send(JSON.stringify({ id: 2, control: { kind: 'piece', step: 1 } }));
    open.ws.send(JSON.stringify({ id: 3, control: { kind: 'flip', on: 'yes' } }));
    open.ws.send(JSON.stringify({ id: 4, control: { kind: 'write-file', path: '/etc/passwd' } }));
    open.ws.send('not json');
    await until(() => open.messages.filter((m) => m.type === 'result').length === 4);
    const results = open.messages.filter((m) => m.type === 'result').map((m) => [m['id'], m['result']]);
    expect(results).toEqual([
      [1, { ok: true }],
      [2, { ok: false, reason: 'no programme' }],
      [3, { ok: false, reason: 'flip: on must be true or false' }],
      [4, { ok: false, reason: 'unknown control "write-file"' }],
    ]);
    expect(heard).toEqual([{ kind: 'flip', on: true }, { kind: 'piece', step: 1 }]);
    open.ws.close();
  });
});

describe('the stage page opened to the network (--page-host)', () => {
  it('requires the token for the page, the WebSocket and every control, and refuses other origins', async () => {
    expect(lanAddress).toBeDefined();
    const server = await serve({ host: lanAddress! });
    const token = server.token!;
    expect(token).toMatch(/^[A-Za-z0-9_-]{24}$/u); // 18 random bytes
    expect(server.url).toBe(`http://${lanAddress}:${server.port}/?token=${token}`);
    expect((await get(lanAddress!, server.port, '/')).status).toBe(403);
    expect((await get(lanAddress!, server.port, '/?token=wrong')).status).toBe(403);
    expect((await get(lanAddress!, server.port, '/stage.js')).status).toBe(403);
    const page = await get(lanAddress!, server.port, `/?token=${token}`);
    expect(page.status).toBe(200);
    // The page's own files then come with the cookie the page was given.
    const cookie = String(page.headers['set-cookie']).split(';')[0]!;
    expect((await get(lanAddress!, server.port, '/stage.js', { cookie })).status).toBe(200);
    const origin = `http://${lanAddress}:${server.port}`;
    expect(await socket(`ws://${lanAddress}:${server.port}/live`, origin)).toEqual({ refused: 403 });
    expect(await socket(`ws://${lanAddress}:${server.port}/live?token=${token}`, 'http://attacker.example')).toEqual({ refused: 403 });
    const heard: StageControl[] = [];
    server.onControl((c) => (heard.push(c), { ok: true }));
    const open = await socket(`ws://${lanAddress}:${server.port}/live?token=${token}`, origin);
    if (!('ws' in open)) throw new Error('refused');
    open.ws.send(JSON.stringify({ id: 1, control: { kind: 'panic' } }));
    open.ws.send(JSON.stringify({ id: 2, token, control: { kind: 'panic' } }));
    await until(() => open.messages.filter((m) => m.type === 'result').length === 2);
    expect(open.messages.filter((m) => m.type === 'result').map((m) => m['result'])).toEqual([{ ok: false, reason: 'this control needs the page’s token' }, { ok: true }]);
    expect(heard).toEqual([{ kind: 'panic' }]);
    open.ws.close();
  });

  it('fails in one line for an address this computer does not have', async () => {
    // 203.0.113.0/24 is reserved for documentation (RFC 5737): no machine has it.
    await expect(new PageServer().start({ host: '203.0.113.7', port: 0 })).rejects.toThrow(/^--page-host 203\.0\.113\.7: this computer has no such address$/u);
  });

  it('fails in one line when the port is taken', async () => {
    const first = await serve();
    const second = new PageServer();
    await expect(second.start({ port: first.port })).rejects.toThrow(new RegExp(`^the page cannot use port ${first.port} on 127\\.0\\.0\\.1: it is taken`, 'u'));
  });
});

describe('page requests', () => {
  it('accept the six shapes and nothing else', () => {
    expect(parseStageControl({ kind: 'set-key', key: 'Bb major' })).toEqual({ kind: 'set-key', key: 'Bb major' });
    expect(parseStageControl({ kind: 'compare-12et', on: false, extra: 1 })).toEqual({ kind: 'compare-12et', on: false });
    expect(parseStageControl({ kind: 'piece', step: 2 })).toBe('piece: step must be 1 or -1');
    expect(parseStageControl({ kind: 'set-key', key: 'x'.repeat(41) })).toMatch(/^set-key:/u);
    expect(parseStageControl(null)).toBe('a control must be an object');
  });
});
