// sync: sends the outbox, pulls what changed and keeps the last view of the
// job in IndexedDB for offline use. After any change the whole job is fetched.

import { api, enc } from './api.js';
import { store } from './store.js';
import { outbox } from './outbox.js';

const PULL_MS = 10000;      // changes from other devices
const CONFIRM_MS = 1500;    // sooner while an acknowledged entry awaits the server's disk sync
const BATCH = 100;          // readings per request
const BACKOFF_MIN = 1000;
const BACKOFF_MAX = 8000;    // a LAN retry is cheap; a phone should not sit on readings for long
const BEAT_MS = 3000;       // between pulls, a tiny probe so the indicator says within seconds that the server is gone
const BEAT_TIMEOUT = 2500;  // a laptop that went to sleep does not refuse, it just never answers

let jobId = null;
let view = null;
let seq = 0;               // the job's change number our view is at
let timer = null;
let running = false;
let again = false;
let backoff = 0;
let online = typeof navigator === 'undefined' ? true : navigator.onLine;
let lastContact = null;
let lastContactMs = 0;
let lastError = '';
let generation = 0;        // bumps on job switch so a late answer for the old job is dropped

const updateFns = new Set();
const statusFns = new Set();

function emitUpdate() {
  for (const fn of updateFns) {
    try { fn(view); } catch (e) { console.error(e); }
  }
}
function emitStatus() {
  const s = sync.status();
  for (const fn of statusFns) {
    try { fn(s); } catch (e) { console.error(e); }
  }
}

let contactSaved = 0;
function contact() {
  const wasOnline = online;
  lastContact = new Date().toISOString();
  lastContactMs = Date.now();
  online = navigator.onLine !== false;
  lastError = '';
  // Kept for the indicator after an offline reload; once in a while is enough.
  if (Date.now() - contactSaved > 5000) {
    contactSaved = Date.now();
    store.setMeta('lastContact', lastContact).catch(() => {});
  }
  if (!wasOnline) emitStatus();
}

function schedule(ms) {
  clearTimeout(timer);
  if (jobId) timer = setTimeout(cycle, ms);
}

class Stale extends Error {}

// One pass: push everything waiting, then pull. Never two at once.
async function cycle() {
  if (!jobId) return;
  if (running) { again = true; return; }
  running = true;
  const gen = generation;
  const j = jobId;
  let next = PULL_MS;
  try {
    do {
      again = false;
      await pushAll(j, gen);
      await pull(j, gen);
    } while (again && gen === generation);
    backoff = 0;
    if (outbox.hasUnconfirmed(j)) next = CONFIRM_MS;
  } catch (e) {
    if (e instanceof Stale) {
      next = 0;
    } else if (e.status === 401) {
      next = PULL_MS; // main sends the device back to the join screen
    } else {
      if (e.status === 0 || e.status === undefined) online = false;
      lastError = e.message || String(e);
      backoff = Math.min(BACKOFF_MAX, backoff ? backoff * 2 : BACKOFF_MIN);
      next = Math.max(backoff, (e.retryAfter || 0) * 1000);
      if (e.status === undefined) console.error(e);
    }
  } finally {
    running = false;
    emitStatus();
    if (gen === generation) schedule(next);
    else schedule(0);
  }
}

function check(gen) {
  if (gen !== generation) throw new Stale();
}

async function acknowledge(j, res) {
  // Sent entries of another server run go back to waiting (a power cut).
  if (res.boot_id && (await outbox.resend(j, res.boot_id)) > 0) again = true;
}

async function pushAll(j, gen) {
  const tried = new Set();
  for (;;) {
    const batch = outbox.waiting(j).filter((r) => !tried.has(r.id)).slice(0, BATCH);
    if (!batch.length) return;
    batch.forEach((r) => tried.add(r.id));
    let res;
    try {
      res = await api.post(`/jobs/${enc(j)}/readings`, { readings: batch.map((r) => r.reading) });
    } catch (e) {
      // 404: the job is not on this server (started on another store?): keep
      // the entries waiting rather than reject them.
      if (e.retryable || e.status === 401 || e.status === 404) throw e;
      check(gen);
      // Refused as a whole: each entry alone, so one bad one holds back none.
      if (batch.length > 1) {
        for (const row of batch) await pushOne(j, gen, row);
        continue;
      }
      await outbox.rejectRows([batch[0].id], e.message, e.field);
      continue;
    }
    check(gen);
    contact();
    await acknowledge(j, res);
    await outbox.applyResults(j, res);
    await confirm(j, res);
  }
}

// confirm drops sent entries on the server's disk and in our view, so a
// screen never sees a reading gone from both (a traverse point read twice).
const confirm = (j, res) => outbox.confirmDurable(j, res.boot_id, Math.min(res.durable_seq || 0, seq));

async function pushOne(j, gen, row) {
  try {
    const res = await api.post(`/jobs/${enc(j)}/readings`, { readings: [row.reading] });
    check(gen);
    contact();
    await acknowledge(j, res);
    await outbox.applyResults(j, res);
  } catch (e) {
    if (e.retryable || e.status === 401 || e.status === 404 || e instanceof Stale) throw e;
    await outbox.rejectRows([row.id], e.message, e.field);
  }
}

async function full(j, gen) {
  const v = await api.get(`/jobs/${enc(j)}`);
  check(gen);
  contact();
  view = v;
  seq = (v.job && v.job.seq) || 0;
  emitUpdate();
  await store.saveSnapshot(j, v);
}

async function pull(j, gen) {
  if (!view || !seq) { await full(j, gen); return; }
  let ch;
  try {
    const epoch = view.epoch ? `&epoch=${enc(view.epoch)}` : '';
    ch = await api.get(`/jobs/${enc(j)}/changes?since=${seq}${epoch}`);
  } catch (e) {
    if (e.status === 409 || e.status === 410) {
      // Our cursor is from a history the store no longer has (it lost its
      // last changes, was restored, or is another server): fetch it all and
      // send every entry we still hold again.
      check(gen);
      await outbox.resend(j, null);
      again = true;
      await full(j, gen);
      return;
    }
    throw e;
  }
  check(gen);
  contact();
  await acknowledge(j, ch);
  if (ch.epoch && view.epoch && ch.epoch !== view.epoch) { await full(j, gen); return; }
  const changed = ch.seq !== seq || Object.values(ch).some((v) => Array.isArray(v) && v.length > 0);
  if (changed) await full(j, gen);
  await confirm(j, ch);
}

export const sync = {
  // start(jobId): show the kept view at once, then talk to the server.
  async start(id) {
    if (id === jobId) { this.kick(); return; }
    this.stop();
    jobId = id;
    const gen = generation;
    view = await store.snapshot(id).catch(() => null);
    if (gen !== generation) return;
    seq = (view && view.job && view.job.seq) || 0;
    if (!lastContact) lastContact = store.metaSync('lastContact');
    if (view) emitUpdate();
    emitStatus();
    this.kick();
  },

  stop() {
    generation++;
    clearTimeout(timer);
    jobId = null;
    view = null;
    seq = 0;
    backoff = 0;
  },

  kick() { if (jobId) schedule(0); },

  // refresh: fetch the whole job now (after a lead's edit).
  async refresh() {
    if (!jobId) return;
    const gen = generation;
    try { await full(jobId, gen); } catch (e) { if (!(e instanceof Stale)) throw e; }
    emitStatus();
  },

  noteContact() { contact(); emitStatus(); },

  view() { return view; },
  jobId() { return jobId; },

  onUpdate(fn) { updateFns.add(fn); return () => updateFns.delete(fn); },
  onStatus(fn) { statusFns.add(fn); return () => statusFns.delete(fn); },

  status() {
    const c = outbox.counts(jobId || undefined);
    const network = typeof navigator === 'undefined' || navigator.onLine !== false;
    return {
      online: online && network,
      network, // false: the device itself has no network (else the server is what is unreachable)
      waiting: c.waiting,
      sent: c.sent,
      rejected: c.rejected,
      lastContact: lastContact || store.metaSync('lastContact'),
      error: lastError,
    };
  },
};

// beat probes a server not heard from lately: a failure shows at once, an
// answer after one sends what waits without the backoff.
async function beat() {
  if (document.visibilityState === 'hidden' || !api.hasToken()) return;
  if (navigator.onLine === false || Date.now() - lastContactMs < 1000) return;
  const wasOnline = online;
  try {
    await api.get('/health', { noToken: true, timeout: BEAT_TIMEOUT });
    if (!wasOnline) { backoff = 0; sync.kick(); }
  } catch (e) {
    if (e.status !== 0 || Date.now() - lastContactMs < BEAT_MS) return; // answered, or something else got through meanwhile
    online = false;
    lastError = 'The server does not answer.';
    emitStatus(); // also every beat while it is gone, so "how long ago" stays true
  }
}

outbox.setKick(() => sync.kick());
outbox.onChange(emitStatus);

if (typeof window !== 'undefined') {
  window.addEventListener('online', () => { online = true; backoff = 0; emitStatus(); sync.kick(); });
  window.addEventListener('offline', () => { online = false; emitStatus(); });
  document.addEventListener('visibilitychange', () => { if (document.visibilityState === 'visible') sync.kick(); });
  setInterval(beat, BEAT_MS);
}
