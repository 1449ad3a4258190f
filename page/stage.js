// The stage page: shows the state diesis publishes and sends the player's requests back.
// Plain browser JavaScript, no library, nothing fetched from anywhere but this page's own server.

const $ = (id) => document.getElementById(id);
const token = new URLSearchParams(location.search).get('token') ?? undefined;

const WHITE = [0, 2, 4, 5, 7, 9, 11];
/** Black keys sit over the gap after this many white keys. */
const BLACK_AFTER = { 1: 1, 3: 2, 6: 4, 8: 5, 10: 6 };
const TONICS = ['Cb', 'Gb', 'Db', 'Ab', 'Eb', 'Bb', 'F', 'C', 'G', 'D', 'A', 'E', 'B', 'F#', 'C#', 'G#', 'D#', 'A#'];
const pretty = (name) => name.replace(/#/g, '♯').replace(/b$/, '♭');

let socket;
let state;
let nextId = 1;
let retryMs = 400;
/** The key choosers start at the key in force, once; after that they are the player's. */
let chooserSet = false;

function figure(n, digits) {
  const text = Math.abs(n).toFixed(digits);
  if (Number(text) === 0) return text;
  return (n < 0 ? '\u2212' : '+') + text;
}
const direction = (cents) => (Math.abs(cents) < 0.05 ? '' : cents > 0 ? 'up' : 'down');

function el(tag, className, text) {
  const node = document.createElement(tag);
  if (className) node.className = className;
  if (text !== undefined) node.textContent = text;
  return node;
}

function buildKeyboard() {
  const board = $('keyboard');
  for (let chroma = 0; chroma < 12; chroma++) {
    const black = chroma in BLACK_AFTER;
    const key = el('div', `key ${black ? 'black' : 'white'}`);
    key.id = `key-${chroma}`;
    key.dataset.chroma = String(chroma);
    const left = black ? (BLACK_AFTER[chroma] * 100) / 7 - (100 / 7) * 0.36 : (WHITE.indexOf(chroma) * 100) / 7;
    key.style.left = `calc(${left}% + 3px)`;
    key.append(el('span', 'spelling', ''), el('span', 'cents', ''));
    board.append(key);
  }
  for (const t of TONICS) {
    const option = el('option', '', pretty(t));
    option.value = t;
    $('tonic').append(option);
  }
  $('tonic').value = 'C';
}

function send(control) {
  if (!socket || socket.readyState !== WebSocket.OPEN) {
    answer('not connected: the request was not sent');
    return;
  }
  socket.send(JSON.stringify({ id: nextId++, token, control }));
}

function answer(text) {
  $('answer').textContent = text;
}

function setLamp(id, on, label) {
  const lamp = $(id);
  lamp.classList.toggle('on', on);
  if (label !== undefined) lamp.textContent = label;
}

function render(s) {
  state = s;
  $('piece-title').textContent = s.piece.title;
  $('piece-count').textContent = s.piece.count > 1 ? `${s.piece.index + 1} / ${s.piece.count}` : '';
  document.title = `diesis · ${s.piece.title}`;
  $('tuning-name').textContent = s.tuning.name;
  $('reference').textContent = s.reference;
  $('bar').hidden = s.bar === null;
  $('bar').textContent = s.bar === null ? '' : `bar ${s.bar}`;
  $('strategy').textContent = s.strategy;
  $('key').textContent = s.key ?? '—';
  $('window').textContent = s.window;
  $('passing').hidden = !s.passing;
  $('synth-gone').hidden = s.synthConnected;

  const lit = new Set(s.sounding.map((n) => n.key % 12));
  for (const k of s.keys) {
    const key = $(`key-${k.chroma}`);
    key.querySelector('.spelling').textContent = k.spelling;
    const cents = key.querySelector('.cents');
    cents.textContent = figure(k.cents, 1);
    cents.className = `cents ${direction(k.cents)}`;
    key.classList.toggle('lit', lit.has(k.chroma));
    key.title = `${k.spelling}: ${figure(k.cents, 1)} cents from 12-ET`;
  }

  const list = $('sounding');
  list.replaceChildren(
    ...s.sounding.map((n) => {
      const item = el('li', `note${n.pedalHeld ? ' held' : ''}`);
      item.dataset.spelling = n.spelling;
      item.append(el('span', 'name', n.spelling), el('span', `cents ${direction(n.cents)}`, `${figure(n.cents, 1)} ¢`), el('span', 'hz', `${n.hz.toFixed(2)} Hz`));
      if (n.pedalHeld) item.append(el('span', 'pedal', 'pedal'));
      return item;
    }),
  );
  $('sounding-count').textContent = `(${s.sounding.length})`;

  setLamp('lamp-sustain', s.pedals.sustain);
  setLamp('lamp-sostenuto', s.pedals.sostenuto);
  setLamp('lamp-flip', s.latches.flip);
  setLamp('lamp-freeze', s.latches.freeze);
  setLamp('lamp-force', s.latches.force !== null, s.latches.force ?? 'sharps/flats');
  setLamp('lamp-shift', s.latches.shift !== 0, `shift ${s.latches.shift > 0 ? '+' : ''}${s.latches.shift}`);

  const warnings = $('warnings');
  warnings.replaceChildren(...(s.warnings.length === 0 ? [el('li', 'none', 'none')] : [...s.warnings].reverse().map((w) => el('li', '', w.text))));

  if (!chooserSet && s.key) {
    const match = /^(?:tonic )?([A-G][♯♭]?)(?: (major|minor))?$/.exec(s.key);
    const tonic = match?.[1].replace('♯', '#').replace('♭', 'b');
    if (tonic && TONICS.includes(tonic)) $('tonic').value = tonic;
    if (match?.[2]) $('mode').value = match[2];
    chooserSet = true;
  }

  $('previous').disabled = !s.piece.canPrevious;
  $('next').disabled = !s.piece.canNext;
  for (const [id, on] of [['flip', s.latches.flip], ['freeze', s.latches.freeze], ['compare', s.passing]]) $(id).setAttribute('aria-pressed', String(on));
}

function showPicture(svg) {
  $('picture').src = `data:image/svg+xml;charset=utf-8,${encodeURIComponent(svg)}`;
}

function connect() {
  const link = $('link');
  link.dataset.state = 'connecting';
  link.textContent = 'connecting…';
  const url = `${location.protocol === 'https:' ? 'wss' : 'ws'}://${location.host}/live${token ? `?token=${encodeURIComponent(token)}` : ''}`;
  const ws = new WebSocket(url);
  socket = ws;
  ws.addEventListener('open', () => {
    retryMs = 400;
    link.dataset.state = 'open';
    link.textContent = 'live';
  });
  ws.addEventListener('message', (event) => {
    const message = JSON.parse(event.data);
    if (message.type === 'state') render(message.state);
    else if (message.type === 'picture') showPicture(message.svg);
    else if (message.type === 'result') answer(message.result.ok ? '' : message.result.reason);
  });
  ws.addEventListener('close', () => {
    if (socket !== ws) return;
    link.dataset.state = 'closed';
    link.textContent = 'diesis not reachable: trying again…';
    setTimeout(connect, retryMs);
    retryMs = Math.min(retryMs * 2, 3000);
  });
}

function wire() {
  const panic = $('panic');
  panic.addEventListener('click', () => {
    send({ kind: 'panic' });
    panic.classList.add('fired');
    setTimeout(() => panic.classList.remove('fired'), 300);
  });
  $('previous').addEventListener('click', () => send({ kind: 'piece', step: -1 }));
  $('next').addEventListener('click', () => send({ kind: 'piece', step: 1 }));
  $('flip').addEventListener('click', () => send({ kind: 'flip', on: !(state?.latches.flip ?? false) }));
  $('freeze').addEventListener('click', () => send({ kind: 'freeze', on: !(state?.latches.freeze ?? false) }));
  $('compare').addEventListener('click', () => send({ kind: 'compare-12et', on: !(state?.passing ?? false) }));
  $('set-key').addEventListener('click', () => send({ kind: 'set-key', key: `${$('tonic').value} ${$('mode').value}` }));
}

buildKeyboard();
wire();
connect();
