// IndexedDB: the outbox, the last view of each job and small settings
// ("meta"). A write counts only once its transaction's complete event has
// fired; outbox writes ask for strict durability (flushed to disk first).

const DB_NAME = 'fieldtab';
const DB_VERSION = 1;

let dbPromise = null;
const metaCache = new Map(); // meta is small and read while rendering, so keep a copy

function open() {
  if (dbPromise) return dbPromise;
  dbPromise = new Promise((resolve, reject) => {
    if (!('indexedDB' in self)) { reject(new Error('This browser has no IndexedDB, so entries cannot be kept offline.')); return; }
    const req = indexedDB.open(DB_NAME, DB_VERSION);
    req.onupgradeneeded = () => {
      const db = req.result;
      if (!db.objectStoreNames.contains('meta')) db.createObjectStore('meta');
      if (!db.objectStoreNames.contains('views')) db.createObjectStore('views');
      if (!db.objectStoreNames.contains('outbox')) {
        db.createObjectStore('outbox', { keyPath: 'id' }).createIndex('job', 'job');
      }
    };
    req.onsuccess = () => {
      const db = req.result;
      // Another tab with a newer app asks to upgrade: let it.
      db.onversionchange = () => { db.close(); dbPromise = null; };
      resolve(db);
    };
    req.onerror = () => reject(req.error || new Error('IndexedDB could not be opened.'));
    req.onblocked = () => reject(new Error('Close the other fieldtab tabs and reload.'));
  });
  return dbPromise;
}

// run(stores, mode, fn) runs fn(tx) and resolves with fn's result once the
// transaction is complete (not merely when the request succeeded).
async function run(stores, mode, fn, strict) {
  const db = await open();
  return new Promise((resolve, reject) => {
    const tx = strict ? db.transaction(stores, mode, { durability: 'strict' }) : db.transaction(stores, mode);
    let result;
    new Promise((r) => r(fn(tx))).then((r) => { result = r; }, (e) => { try { tx.abort(); } catch { /* done */ } reject(e); });
    tx.oncomplete = () => resolve(result);
    tx.onerror = () => reject(tx.error || new Error('IndexedDB write failed.'));
    tx.onabort = () => reject(tx.error || new Error('IndexedDB write was aborted (is the disk full?).'));
  });
}

function req(r) {
  return new Promise((resolve, reject) => {
    r.onsuccess = () => resolve(r.result);
    r.onerror = () => reject(r.error);
  });
}

export const store = {
  // init opens the database and loads meta into memory.
  async init() {
    await run(['meta'], 'readonly', (tx) => {
      const os = tx.objectStore('meta');
      const c = os.openCursor();
      c.onsuccess = () => {
        const cur = c.result;
        if (!cur) return;
        metaCache.set(cur.key, cur.value);
        cur.continue();
      };
    });
  },

  async getMeta(key) {
    if (metaCache.has(key)) return metaCache.get(key);
    const v = await run(['meta'], 'readonly', (tx) => req(tx.objectStore('meta').get(key)));
    return v ?? null;
  },
  // metaSync(key): the in-memory copy, for code that renders synchronously.
  metaSync(key) { return metaCache.has(key) ? metaCache.get(key) : null; },
  async setMeta(key, value) {
    metaCache.set(key, value);
    await run(['meta'], 'readwrite', (tx) => {
      if (value === null || value === undefined) tx.objectStore('meta').delete(key);
      else tx.objectStore('meta').put(value, key);
    });
  },

  async snapshot(jobId) {
    const v = await run(['views'], 'readonly', (tx) => req(tx.objectStore('views').get(jobId)));
    return v ?? null;
  },
  async saveSnapshot(jobId, view) {
    await run(['views'], 'readwrite', (tx) => { tx.objectStore('views').put(view, jobId); });
  },

  // Outbox rows: {id, job, reading, state, reason, field, seq, boot_id, created}.
  async outboxAll() {
    return run(['outbox'], 'readonly', (tx) => req(tx.objectStore('outbox').getAll()));
  },
  // outboxWrite(puts, deletes) in one strict transaction: a fix replaces the
  // rejected entry with its correction atomically.
  async outboxWrite(puts = [], deletes = []) {
    await run(['outbox'], 'readwrite', (tx) => {
      const os = tx.objectStore('outbox');
      for (const id of deletes) os.delete(id);
      for (const row of puts) os.put(row);
    }, true);
  },
};
