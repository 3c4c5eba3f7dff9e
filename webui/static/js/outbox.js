// The outbox: every reading goes to IndexedDB first, then sync.js sends it.
// waiting: not yet acknowledged; sent: acknowledged with `seq` under `boot_id`,
// kept until that change is on the server's disk and in the view; rejected:
// refused, kept with the reason until fixed or discarded. Resending is safe.

import { store } from './store.js';

const rows = new Map(); // id → row, the in-memory copy of the outbox store
const listeners = new Set();
// Entries delivered and dropped this session: the history shows them even
// when no redraw caught them in the outbox (a void is in no job view).
const delivered = new Map();
let kick = () => {};

// newUUID: a v4 UUID (crypto.randomUUID needs a secure context; LAN http is not).
export function newUUID() {
  const b = crypto.getRandomValues(new Uint8Array(16));
  b[6] = (b[6] & 0x0f) | 0x40;
  b[8] = (b[8] & 0x3f) | 0x80;
  const x = Array.from(b, (v) => v.toString(16).padStart(2, '0')).join('');
  return `${x.slice(0, 8)}-${x.slice(8, 12)}-${x.slice(12, 16)}-${x.slice(16, 20)}-${x.slice(20)}`;
}

function technician() {
  const d = store.metaSync('device');
  return store.metaSync('technician') || (d && d.name) || '';
}

// The server refuses unknown fields, so a reading is rebuilt with exactly these.
function cleanReading(r) {
  const out = {
    id: r.id,
    subject_kind: r.subject_kind,
    subject_id: r.subject_id,
    quantity: r.quantity,
    point: Number(r.point) || 0,
    unit: r.unit ?? '',
    stage: r.stage || 'final',
    instrument_id: r.instrument_id || '',
    technician: r.technician || technician(),
    taken_at: r.taken_at || new Date().toISOString(),
    supersedes: r.supersedes || '',
    void: !!r.void,
    note: r.note || '',
    confirmed: !!r.confirmed, // the technician confirmed a value far from design or its neighbours
  };
  if (!out.void && r.value !== null && r.value !== undefined) out.value = Number(r.value);
  return out;
}

function notify() {
  for (const fn of listeners) {
    try { fn(); } catch (e) { console.error(e); }
  }
}

function byCreated(a, b) { return a.created - b.created || (a.id < b.id ? -1 : 1); }

export const outbox = {
  async load() {
    rows.clear();
    for (const r of await store.outboxAll()) rows.set(r.id, r);
  },

  setKick(fn) { kick = fn; },

  // add(jobId, reading) resolves once the entry is on disk, then starts a send.
  async add(jobId, reading) {
    const rd = cleanReading({ ...reading, id: reading.id || newUUID() });
    const row = { id: rd.id, job: jobId, reading: rd, state: 'waiting', reason: '', field: '', seq: 0, boot_id: '', created: Date.now() };
    await store.outboxWrite([row]);
    rows.set(row.id, row);
    notify();
    kick();
    return row;
  },

  // addMany: several entries in one transaction.
  async addMany(jobId, readings) {
    const now = Date.now();
    const list = readings.map((r, i) => {
      const rd = cleanReading({ ...r, id: r.id || newUUID() });
      return { id: rd.id, job: jobId, reading: rd, state: 'waiting', reason: '', field: '', seq: 0, boot_id: '', created: now + i / 1000 };
    });
    if (!list.length) return [];
    await store.outboxWrite(list);
    for (const row of list) rows.set(row.id, row);
    notify();
    kick();
    return list;
  },

  entries(jobId) {
    return [...rows.values()].filter((r) => !jobId || r.job === jobId).sort(byCreated);
  },

  get(id) { return rows.get(id) || null; },

  counts(jobId) {
    const c = { waiting: 0, sent: 0, rejected: 0 };
    for (const r of rows.values()) if (!jobId || r.job === jobId) c[r.state]++;
    return c;
  },

  // forSubject: entries of one outlet, test or system, newest last.
  forSubject(jobId, kind, id) {
    return this.entries(jobId).filter((r) => r.reading.subject_kind === kind && r.reading.subject_id === id);
  },

  async discard(id) {
    if (!rows.has(id)) return;
    await store.outboxWrite([], [id]);
    rows.delete(id);
    notify();
  },

  // fix: a rejected entry replaced by a corrected one with a new id (the first
  // never reached the store), taken at the original's time.
  async fix(id, newValue, changes = {}) {
    const old = rows.get(id);
    if (!old) return null;
    const rd = cleanReading({ ...old.reading, ...changes, value: newValue, id: newUUID() });
    const row = { ...old, id: rd.id, reading: rd, state: 'waiting', reason: '', field: '', seq: 0, boot_id: '', created: Date.now() };
    await store.outboxWrite([row], [id]);
    rows.delete(id);
    rows.set(row.id, row);
    notify();
    kick();
    return row;
  },

  onChange(fn) { listeners.add(fn); return () => listeners.delete(fn); },

  waiting(jobId) { return this.entries(jobId).filter((r) => r.state === 'waiting'); },

  async applyResults(jobId, response) {
    const puts = [];
    for (const res of response.results || []) {
      const row = rows.get(res.id);
      if (!row || row.job !== jobId) continue;
      let next;
      if (res.status === 'stored' || res.status === 'duplicate') {
        // A duplicate may come without its seq: the batch's seq is an upper bound.
        next = { ...row, state: 'sent', seq: res.seq || response.seq || 0, boot_id: response.boot_id || '', reason: '', field: '' };
      } else if (res.status === 'rejected') {
        next = { ...row, state: 'rejected', reason: res.reason || 'refused by the server', field: res.field || '' };
      } else continue;
      puts.push(next);
    }
    if (!puts.length) return;
    await store.outboxWrite(puts);
    for (const r of puts) rows.set(r.id, r);
    notify();
  },

  // rejectRows marks entries refused as a whole request (e.g. the job is gone).
  async rejectRows(ids, reason, field) {
    const puts = ids.map((id) => rows.get(id)).filter(Boolean).map((r) => ({ ...r, state: 'rejected', reason, field: field || '' }));
    if (!puts.length) return;
    await store.outboxWrite(puts);
    for (const r of puts) rows.set(r.id, r);
    notify();
  },

  // confirmDurable deletes sent entries whose change is on the server's disk.
  async confirmDurable(jobId, bootId, durableSeq) {
    if (!bootId) return;
    const ids = [];
    for (const r of rows.values()) {
      if (r.job === jobId && r.state === 'sent' && r.boot_id === bootId && r.seq > 0 && r.seq <= durableSeq) ids.push(r.id);
    }
    if (!ids.length) return;
    await store.outboxWrite([], ids);
    for (const id of ids) { delivered.set(id, rows.get(id)); rows.delete(id); }
    notify();
  },

  // deliveredFor: this session's delivered entries of one subject.
  deliveredFor(jobId, kind, id) {
    return [...delivered.values()].filter((r) => r.job === jobId && r.reading.subject_kind === kind && r.reading.subject_id === id);
  },

  // resend: sent entries back to waiting when the server run changed (it may
  // have lost power before its disk sync) or, bootId null, always.
  async resend(jobId, bootId) {
    const puts = [];
    for (const r of rows.values()) {
      if (r.job === jobId && r.state === 'sent' && (bootId === null || r.boot_id !== bootId)) {
        puts.push({ ...r, state: 'waiting', seq: 0, boot_id: '' });
      }
    }
    if (!puts.length) return 0;
    await store.outboxWrite(puts);
    for (const r of puts) rows.set(r.id, r);
    notify();
    return puts.length;
  },

  hasUnconfirmed(jobId) {
    for (const r of rows.values()) if (r.job === jobId && r.state === 'sent') return true;
    return false;
  },
};
