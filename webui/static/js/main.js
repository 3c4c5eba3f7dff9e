// The app: a sticky header with the job and the sync indicator, and a hash
// router that loads one screen module per route. Screens export
// render(ctx) → Element (or a Promise of one).

import * as ui from './ui.js';
import { h, clear } from './ui.js';
import { api } from './api.js';
import { store } from './store.js';
import { outbox } from './outbox.js';
import { sync } from './sync.js';
import { q } from './quantities.js';

const SCREENS = {
  join: 'join', jobs: 'jobs', home: 'home', outlets: 'outlets', outlet: 'outlet', traverse: 'traverse',
  capacity: 'capacity', water: 'water', fan: 'fan', outbox: 'outbox', lead: 'lead', signoff: 'signoff',
  setup: 'setup', edit: 'edit', newjob: 'edit',
};
// Screens that need the job's view before they can show anything.
const NEEDS_VIEW = new Set(['home', 'outlets', 'outlet', 'traverse', 'capacity', 'water', 'fan', 'lead', 'setup', 'edit']);

const app = document.getElementById('app');
const top = document.getElementById('top');
let route = { name: 'jobs', params: {} };
let renderToken = 0;
let shownKey = ''; // the route the screen on show was drawn for
let firstRoute = true;
let notice = ''; // one message for the next join screen (e.g. token revoked)

// ---- routes ----

function parse(hash) {
  const raw = (hash || '').replace(/^#/, '');
  if (/^join=/i.test(raw)) return { name: 'join', params: { code: decodeURIComponent(raw.slice(5)) } };
  const [path, query = ''] = raw.split('?');
  const params = Object.fromEntries(new URLSearchParams(query));
  const p = path.split('/').filter(Boolean).map((s) => { try { return decodeURIComponent(s); } catch { return s; } });
  if (!p.length) return { name: 'jobs', params };
  if (p[0] === 'join') return { name: 'join', params };
  if (p[0] === 'new-job') return { name: 'newjob', params: { ...params, kind: 'job' } };
  if (p[0] === 'jobs') return { name: 'jobs', params: { ...params, list: '1' } };
  if (p[0] === 'job' && p[1]) {
    const jobId = p[1];
    const [sub, id] = [p[2], p[3]];
    if (!sub) return { name: 'home', jobId, params };
    const byId = { system: 'outlets', outlet: 'outlet', traverse: 'traverse', capacity: 'capacity', water: 'water', fan: 'fan' };
    if (byId[sub] && id) return { name: byId[sub], jobId, params: { ...params, id } };
    if (sub === 'setup') return { name: sub, jobId, params };
    if (sub === 'edit' && id) return { name: sub, jobId, params: { ...params, kind: id, id: p[4] || '' } };
    if (sub === 'outbox' || sub === 'lead' || sub === 'signoff') return { name: sub, jobId, params };
  }
  return { name: 'notfound', params };
}

// Where "Back" goes from each screen: up the technician's walk.
function parentOf(r, view) {
  if (!r.jobId) return null;
  const job = `#/job/${encodeURIComponent(r.jobId)}`;
  if (r.name === 'home') return '#/jobs';
  if (r.name === 'edit') return `${job}/setup`;
  if (r.name === 'outlet' && view) {
    const o = (view.snapshot.outlets || []).find((x) => x.id === r.params.id);
    if (o) return `${job}/system/${encodeURIComponent(o.system_id)}`;
  }
  return job;
}

// ---- header and the sync indicator ----

const backLink = h('a', { class: 'back', href: '#/', 'data-test': 'back', 'aria-label': 'Back' }, '‹');
const titleEl = h('a', { class: 'title', href: '#/' }, 'fieldtab');
const syncEl = h('a', { class: 'sync', 'data-test': 'sync-status', href: '#/', 'aria-live': 'polite' });
top.appendChild(h('div', { class: 'top-row' }, backLink, titleEl, syncEl));

function paintStatus() {
  const s = sync.status();
  const jobId = route.jobId || sync.jobId();
  syncEl.dataset.online = String(!!s.online);
  syncEl.dataset.waiting = String(s.waiting);
  syncEl.dataset.rejected = String(s.rejected);
  syncEl.dataset.sent = String(s.sent);
  syncEl.className = `sync ${s.online && api.hasToken() ? 'is-online' : 'is-offline'}${s.rejected ? ' has-rejected' : ''}`;
  if (jobId) syncEl.setAttribute('href', `#/job/${encodeURIComponent(jobId)}/outbox`);
  const joined = api.hasToken();
  if (!joined) syncEl.dataset.online = 'false';
  const parts = [!joined ? '○ not joined' : s.online ? '● online' : s.network ? '○ server unreachable' : '○ offline'];
  if (s.waiting) parts.push(`${s.waiting} waiting`);
  if (s.rejected) parts.push(`${s.rejected} rejected`);
  if (!s.waiting && !s.rejected) parts.push(s.sent ? `${s.sent} sent` : 'all sent');
  // Out of touch, how long ago counts more than the clock time.
  parts.push(s.online || !s.lastContact ? `last contact ${ui.timeText(s.lastContact)}` : `last reached ${ui.timeText(s.lastContact)} (${ui.agoText(s.lastContact)})`);
  syncEl.textContent = parts.join(' · ');
  syncEl.title = s.error ? `Last problem: ${s.error}` : 'Open the outbox';
}

function paintHeader(view) {
  const name = view && view.job && view.job.name;
  titleEl.textContent = route.jobId && name ? name : 'fieldtab';
  titleEl.setAttribute('href', route.jobId ? `#/job/${encodeURIComponent(route.jobId)}` : '#/');
  document.title = name && route.jobId ? `${name} · fieldtab` : 'fieldtab';
  const parent = parentOf(route, view);
  backLink.hidden = !parent;
  if (parent) backLink.setAttribute('href', parent);
}

// ---- keeping what the user typed across a re-render ----

// Fields the user changed are marked dirty (data-dirty), so a re-render keeps
// their value and a field they did not touch shows the fresh one.
document.addEventListener('input', markDirty, true);
document.addEventListener('change', markDirty, true);
function markDirty(e) {
  const t = e.target;
  if (t && t.dataset && app.contains(t) && /^(INPUT|SELECT|TEXTAREA)$/.test(t.tagName)) t.dataset.dirty = '1';
}

function fieldKey(el) {
  const d = el.dataset || {};
  return [el.tagName, d.test || '', d.point || '', d.key || '', d.leg || '', el.name || '', el.type || ''].join('|');
}

function keyed(root) {
  const counts = new Map();
  const out = [];
  for (const el of root.querySelectorAll('input, select, textarea, details')) {
    const k = fieldKey(el);
    const n = counts.get(k) || 0;
    counts.set(k, n + 1);
    out.push([`${k}#${n}`, el]);
  }
  return out;
}

function capture(root) {
  const saved = new Map();
  const active = document.activeElement;
  let focus = null;
  for (const [key, el] of keyed(root)) {
    if (el.tagName === 'DETAILS') { saved.set(key, { open: el.open }); continue; }
    if (el === active) {
      focus = { key, start: safe(() => el.selectionStart), end: safe(() => el.selectionEnd) };
    }
    if (changed(el)) saved.set(key, { value: el.value, checked: el.checked });
  }
  return { saved, focus };
}

// changed: the user touched it, or its value differs from what was rendered
// (a value set by script, or by a test driver, fires no input event).
function changed(el) {
  if (el.dataset.dirty) return true;
  if (el.tagName === 'SELECT') return [...el.options].some((o) => o.selected !== o.defaultSelected);
  if (el.type === 'checkbox' || el.type === 'radio') return el.checked !== el.defaultChecked;
  return el.type !== 'file' && el.value !== el.defaultValue;
}

function restore(root, { saved, focus }) {
  for (const [key, el] of keyed(root)) {
    const s = saved.get(key);
    if (s && el.tagName === 'DETAILS') el.open = s.open;
    else if (s && el.type !== 'file') {
      if (el.type === 'checkbox' || el.type === 'radio') el.checked = s.checked;
      else el.value = s.value;
      el.dataset.dirty = '1';
    }
    if (focus && focus.key === key) {
      el.focus({ preventScroll: true });
      if (focus.start !== null && focus.start !== undefined) safe(() => el.setSelectionRange(focus.start, focus.end));
    }
  }
}

function safe(fn) { try { return fn(); } catch { return null; } }

// Updates from sync wait while the user is typing in a field or pressing a
// button, so a re-render never swallows a keystroke or a tap.
let updateTimer = null;
let deferSince = 0;
let pointerDown = false;
let lastPointerUp = 0;
document.addEventListener('pointerdown', () => { pointerDown = true; }, true);
document.addEventListener('pointerup', () => { pointerDown = false; lastPointerUp = Date.now(); }, true);
document.addEventListener('pointercancel', () => { pointerDown = false; }, true);

function scheduleUpdate() {
  clearTimeout(updateTimer);
  updateTimer = setTimeout(tryUpdate, 150);
}

function tryUpdate() {
  const a = document.activeElement;
  const typing = a && app.contains(a) && /^(INPUT|TEXTAREA)$/.test(a.tagName) && a.dataset.dirty;
  const tapping = pointerDown || Date.now() - lastPointerUp < 400;
  if ((typing || tapping) && (!deferSince || Date.now() - deferSince < 8000)) {
    deferSince = deferSince || Date.now();
    updateTimer = setTimeout(tryUpdate, 300);
    return;
  }
  deferSince = 0;
  render('update');
}

// ---- rendering ----

function device() { return store.metaSync('device') || null; }

function ctxFor(r, view) {
  const units = (view && view.job && view.job.units) || 'ip';
  const dev = device();
  return {
    jobId: r.jobId || null,
    params: { ...r.params, auto: firstRoute },
    view,
    role: (dev && dev.role) || 'technician',
    device: dev,
    units,
    q,
    go: (hash) => { if (location.hash === hash) render('route'); else location.hash = hash; },
    replace: (hash) => { location.replace(hash); },
    rerender: () => render('update'),
    notice: () => { const n = notice; notice = ''; return n; },
    outbox, sync, api, store,
  };
}

function problem(title, text, back) {
  return h('section', { class: 'card problem', 'data-test': 'screen-error', role: 'alert' },
    h('h2', {}, title), h('p', {}, text),
    back ? h('p', {}, h('a', { class: 'btn', href: back }, 'Back')) : null);
}

async function render(reason) {
  const token = ++renderToken;
  const r = route;
  if (!api.hasToken() && r.name !== 'join') {
    location.replace('#/join');
    return;
  }
  if (r.jobId && sync.jobId() !== r.jobId) {
    await sync.start(r.jobId);
    store.setMeta('lastJob', r.jobId).catch(() => {});
    if (token !== renderToken) return;
  }
  const view = r.jobId ? sync.view() : null;
  paintHeader(view);
  paintStatus();

  let el;
  if (r.name === 'notfound') {
    el = problem('No such screen', 'This address is not a screen of the app.', '#/');
  } else if (NEEDS_VIEW.has(r.name) && !view) {
    el = h('section', { class: 'card', 'data-test': 'no-view' },
      h('h2', {}, 'Loading the job…'),
      h('p', {}, sync.status().online
        ? 'Fetching the job from the server.'
        : 'This job is not on this device yet. Join the site Wi-Fi to load it; after that it works offline too.'));
  } else {
    const ctx = ctxFor(r, view);
    try {
      const mod = await import(`./screens/${SCREENS[r.name]}.js`);
      if (token !== renderToken) return;
      el = await mod.render(ctx);
    } catch (e) {
      console.error(e);
      el = problem('This screen could not be shown',
        `The ${r.name} screen did not load (${e && e.message ? e.message : e}). The rest of the app still works; your entries are safe in the outbox.`,
        r.jobId ? `#/job/${encodeURIComponent(r.jobId)}` : '#/');
    }
  }
  if (token !== renderToken) return;
  if (!(el instanceof Node)) el = problem('This screen could not be shown', 'The screen gave nothing to show.', '#/');

  // Keep typed values only when the same screen is redrawn, never carry them
  // into another screen (another outlet's entry, say).
  const key = `${r.name}|${r.jobId || ''}|${JSON.stringify(r.params)}`;
  if (reason === 'update' && key !== shownKey) reason = 'route';
  shownKey = key;
  if (reason === 'update') {
    const kept = capture(app);
    const y = window.scrollY;
    app.replaceChildren(el);
    restore(app, kept);
    window.scrollTo(0, y);
  } else {
    app.replaceChildren(el);
    window.scrollTo(0, 0);
    const first = el.querySelector('[autofocus]');
    if (first) first.focus();
  }
  firstRoute = false;
}

function onRoute() {
  route = parse(location.hash);
  clearTimeout(updateTimer);
  deferSince = 0;
  render('route');
}

// ---- boot ----

function fatal(text) {
  clear(app).appendChild(problem('fieldtab cannot start', text));
}

async function boot() {
  try {
    await store.init();
    await outbox.load();
  } catch (e) {
    fatal(`${e.message || e} Entries cannot be kept on this device, so the app will not take readings here.`);
    return;
  }
  api.setToken(store.metaSync('token'));
  api.onContact(() => sync.noteContact());
  api.onUnauthorized(async () => {
    api.setToken('');
    sync.stop();
    await store.setMeta('token', null);
    notice = 'This device is no longer joined (the lead removed it or its token expired). Join again with a new code. Entries not yet sent are kept and are sent once you have joined.';
    location.hash = '#/join';
  });
  await q.load();
  q.onChange(scheduleUpdate);
  sync.onUpdate(() => scheduleUpdate());
  sync.onStatus((s) => { paintStatus(); if (s.online) q.ensure(); });
  outbox.onChange(() => { paintStatus(); scheduleUpdate(); });
  window.addEventListener('hashchange', onRoute);
  onRoute();

  // The role can change on the server (a lead's device re-joined as technician).
  if (api.hasToken()) {
    api.get('/me').then((me) => {
      const old = device();
      if (me && me.device) {
        store.setMeta('device', me.device).then(() => {
          if (!old || old.role !== me.device.role || old.name !== me.device.name) render('update');
        });
      }
    }).catch(() => {});
  }

  // The service worker keeps the app loadable offline. Browsers allow one only
  // in a secure context (https, or localhost); on a plain-http LAN address the
  // app works offline for as long as the page stays open.
  if (window.isSecureContext && 'serviceWorker' in navigator) {
    navigator.serviceWorker.register('sw.js', { scope: './' }).catch((e) => console.warn('service worker:', e));
  }
}

boot();
