// A system's outlets: filter (kept for the session; "Next outlet" follows it)
// and a search by tag or room across every system.

import { h, fmt, statusBadge, kindWord, select, clear } from '../ui.js';

const byTag = (a, b) => a.tag.localeCompare(b.tag, undefined, { numeric: true, sensitivity: 'base' });

function key(jobId, sysId) { return `ft-outlets:${jobId}:${sysId}`; }

export function filterState(jobId, sysId) {
  try {
    const s = JSON.parse(sessionStorage.getItem(key(jobId, sysId)) || 'null');
    if (s && ['unread', 'out', 'all'].includes(s.filter)) return { filter: s.filter, search: String(s.search || '') };
  } catch { /* no session storage: defaults */ }
  return { filter: 'unread', search: '' };
}

function saveFilter(jobId, sysId, st) {
  try { sessionStorage.setItem(key(jobId, sysId), JSON.stringify(st)); } catch { /* fine */ }
}

// pendingOutlets: outlet id → 'waiting' | 'rejected', for entries not in the view.
export function pendingOutlets(ctx) {
  const inView = new Set((ctx.view.snapshot.readings || []).map((r) => r.id));
  const m = new Map();
  for (const e of ctx.outbox.entries(ctx.jobId)) {
    if (e.reading.subject_kind !== 'outlet') continue;
    if (e.state === 'rejected') m.set(e.reading.subject_id, 'rejected');
    else if (!inView.has(e.id) && m.get(e.reading.subject_id) !== 'rejected') m.set(e.reading.subject_id, 'waiting');
  }
  return m;
}

export function passes(o, st, pending) {
  if (st.filter === 'unread' && (o.status !== 'not_read' || pending.has(o.id))) return false;
  if (st.filter === 'out' && o.status !== 'low' && o.status !== 'high') return false;
  const s = st.search.trim().toLowerCase();
  if (s && !(`${o.tag}`.toLowerCase().includes(s) || `${o.room || ''}`.toLowerCase().includes(s))) return false;
  return true;
}

// systemOutlets: a system's outlet results in walking order (by tag).
export function systemOutlets(ctx, sysId) {
  return (ctx.view.results.outlets || []).filter((o) => o.system_id === sysId).sort(byTag);
}

const everyOutlet = (ctx) => [...(ctx.view.results.outlets || [])].sort((a, b) => String(a.system_tag).localeCompare(String(b.system_tag)) || byTag(a, b));

// nextOutlet: the next outlet of the system the list's filter still shows.
export function nextOutlet(ctx, sysId, id) {
  const all = systemOutlets(ctx, sysId);
  const st = filterState(ctx.jobId, sysId);
  const pending = pendingOutlets(ctx);
  const i = all.findIndex((o) => o.id === id);
  for (let k = i + 1; k < all.length; k++) if (passes(all[k], st, pending)) return all[k];
  return null;
}

function governing(o) { return o.final || o.as_found || null; }

function item(ctx, o, pend, airUnit, other) {
  const g = governing(o);
  const stageWord = o.final ? 'final' : 'as found';
  const figs = g && g.flow !== undefined && g.flow !== null
    ? `${stageWord} ${fmt(g.flow)} of ${fmt(o.design_flow)} ${airUnit}` + (g.tolerance ? ` (${fmt(g.tolerance.percent_of_design, 0)} %)` : '')
    : `design ${fmt(o.design_flow)} ${airUnit}`;
  return h('li', {}, h('a', {
    class: 'item', href: `#/job/${encodeURIComponent(ctx.jobId)}/outlet/${encodeURIComponent(o.id)}`,
    'data-test': 'outlet-item', 'data-tag': o.tag, 'data-status': o.status, 'data-pending': pend || null,
  },
  h('span', { class: 'tag' }, o.tag),
  h('span', { class: 'room' }, other ? `${o.system_tag} · ` : '', o.room, h('br', {}), h('span', { class: 'figs small' }, `${kindWord(o.kind)} · ${figs}`)),
  h('span', { class: 'badges' },
    pend ? statusBadge(pend === 'rejected' ? 'rejected' : 'waiting') : null,
    (o.flags || []).length ? statusBadge('flag', o.flags.every((f) => f.kind === 'no_instrument') ? 'no instrument: no ±' : null) : null,
    statusBadge(o.status))));
}

export function render(ctx) {
  const sysId = ctx.params.id;
  const sys = (ctx.view.results.systems || []).find((s) => s.id === sysId);
  const all = systemOutlets(ctx, sysId);
  const pending = pendingOutlets(ctx);
  const st = filterState(ctx.jobId, sysId);
  const airUnit = (ctx.view.results.units || {}).air_flow || '';
  const counts = {
    unread: all.filter((o) => passes(o, { filter: 'unread', search: '' }, pending)).length,
    out: all.filter((o) => o.status === 'low' || o.status === 'high').length,
    all: all.length,
  };

  const filterSel = select({ id: 'outlet-filter', 'data-test': 'outlet-filter', 'aria-label': 'Show' }, [
    ['unread', `Not read (${counts.unread})`],
    ['out', `Low or high (${counts.out})`],
    ['all', `All (${counts.all})`],
  ], st.filter);
  const search = h('input', {
    id: 'outlet-search', type: 'search', 'data-test': 'outlet-search', placeholder: 'Tag or room', 'aria-label': 'Search', autocomplete: 'off', value: st.search || null,
  });
  const list = h('ul', { class: 'list two', 'data-test': 'outlet-list' });
  const countEl = h('p', { class: 'sub', 'aria-live': 'polite' });

  // Only the list is rebuilt while filtering, so the search box keeps focus.
  function paint() {
    const cur = { filter: filterSel.value, search: search.value };
    saveFilter(ctx.jobId, sysId, cur);
    // A tag read off a ceiling does not say its system: search them all.
    const src = cur.search.trim() ? everyOutlet(ctx) : all;
    const shown = src.filter((o) => passes(o, cur, pending));
    clear(list);
    const frag = document.createDocumentFragment();
    for (const o of shown) frag.appendChild(item(ctx, o, pending.get(o.id), airUnit, o.system_id !== sysId));
    list.appendChild(frag);
    countEl.textContent = src !== all ? `${fmt(shown.length, 0)} found in all systems` : shown.length === all.length ? `${fmt(all.length, 0)} outlets` : `${fmt(shown.length, 0)} of ${fmt(all.length, 0)} outlets shown`;
    if (!shown.length) list.appendChild(h('li', { class: 'item muted' }, cur.filter === 'unread' ? 'Every outlet here is read.' : 'No outlet matches.'));
  }
  filterSel.addEventListener('change', paint);
  search.addEventListener('input', paint);
  paint();

  return h('div', { 'data-test': 'outlet-list-screen' },
    h('div', { class: 'screen-head' },
      h('h1', {}, sys ? `${sys.tag} outlets` : 'Outlets'),
      sys ? h('p', { class: 'sub' }, sys.name) : null),
    h('section', { class: 'card' },
      h('div', { class: 'filter-row' }, search, filterSel),
      countEl,
      list));
}
