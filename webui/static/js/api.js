// The server's JSON API. One place holds the device token and turns every
// failure into an ApiError, so screens only decide what to say.

export class ApiError extends Error {
  // status 0 means the request never got an answer (offline, timed out).
  constructor(status, message, field, retryAfter) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.field = field || '';
    this.retryAfter = retryAfter || 0; // seconds, from a 429's Retry-After
  }
  get network() { return this.status === 0; }
  // Worth trying again later: no answer, the server busy or failing.
  get retryable() { return this.status === 0 || this.status === 429 || this.status >= 500; }
}

// A hung request (Wi-Fi that drops without closing the connection) must not
// hold the outbox forever.
const TIMEOUT_MS = 20000;

let token = '';
let onUnauthorized = null;
let onContact = null; // any answer at all means the server is reachable

async function request(method, path, body, opts = {}) {
  const headers = {};
  if (token && !opts.noToken) headers.Authorization = `Bearer ${token}`;
  let payload;
  if (body !== undefined) {
    if (typeof body === 'string') {
      payload = body;
      headers['Content-Type'] = opts.contentType || 'text/plain';
    } else {
      payload = JSON.stringify(body);
      headers['Content-Type'] = 'application/json';
    }
  }
  const ctl = new AbortController();
  const timer = setTimeout(() => ctl.abort(), opts.timeout || TIMEOUT_MS);
  let res;
  try {
    res = await fetch(api.base + path, { method, headers, body: payload, signal: ctl.signal, cache: 'no-store' });
  } catch (e) {
    throw new ApiError(0, 'The server cannot be reached.');
  } finally {
    clearTimeout(timer);
  }
  if (onContact) onContact();
  let data = null;
  const text = await res.text().catch(() => '');
  if (text) {
    try { data = JSON.parse(text); } catch { data = null; }
  }
  if (!res.ok) {
    const msg = (data && data.error) || `The server answered ${res.status} ${res.statusText}.`;
    const err = new ApiError(res.status, msg, data && data.field, Number(res.headers.get('Retry-After')) || 0);
    err.data = data;
    // A revoked or unknown token: the app goes back to the join screen
    // (pairing itself answers 401 for a wrong code, which is not that).
    if (res.status === 401 && headers.Authorization && onUnauthorized) onUnauthorized(err);
    throw err;
  }
  return data;
}

export const api = {
  base: '/api/v1',
  setToken(t) { token = t || ''; },
  hasToken() { return !!token; },
  onUnauthorized(fn) { onUnauthorized = fn; },
  onContact(fn) { onContact = fn; },
  get: (path, opts) => request('GET', path, undefined, opts),
  post: (path, body, opts) => request('POST', path, body, opts),
  put: (path, body, opts) => request('PUT', path, body, opts),
  del: (path, opts) => request('DELETE', path, undefined, opts),
};

export const enc = encodeURIComponent;
