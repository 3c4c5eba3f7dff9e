// Outlet list of one system: filter (not read yet / out of tolerance / all)
// and search by tag or room. The filter is kept for the session, and the
// outlet screen's "Next outlet" follows the same list.

import { h, fmt, statusBadge, kindWord, select, clear } from '../ui.js';

const byTag = (a, b) => a.tag.localeCompare(b.tag, undefined, { numeric: true, sensitivity: 'base' });

function key(jobId, sysId) { return `ft-outlets:${jobId}:${sysId}`; }

export function filterState(jobId, sysId) {
  try {
    const s = JSON.parse(sessionStorage.getItem(key(jobId, sysId)) || 'null');
    if (s && ['unread', 'out', 'all'].includes(s.filter)) return { filter: s.filter, search: String(s.search || '') };
  } catch { /* no session storage: defaults */ }
  return { filter: 'all', search: '' };
}

function saveFilter(jobId, sysId, st) {
  try { sessionStorage.setItem(key(jobId, sysId), JSON.stringify(st)); } catch { /* fine */ }
}

// pendingOutlets: outlet ids with an entry the server's view does not show
// yet (waiting, or sent but not fetched back) → 'waiting' | 'rejected'.
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

// nextOutlet: the first outlet after `id` in the system's order that the
// list's filter and search still show.
export function nextOutlet(ctx, sysId, id) {
  const all = systemOutlets(ctx, sysId);
  const st = filterState(ctx.jobId, sysId);
  const pending = pendingOutlets(ctx);
  const i = all.findIndex((o) => o.id === id);
  for (let k = i + 1; k < all.length; k++) if (passes(all[k], st, pending)) return all[k];
  return null;
}

function governing(o) { return o.final || o.as_found || null; }

function item(ctx, o, pend, airUnit) {
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
  h('span', { class: 'room' }, o.room, h('br', {}), h('span', { class: 'figs small' }, `${kindWord(o.kind)} · ${figs}`)),
  h('span', { class: 'badges' },
    pend ? statusBadge(pend === 'rejected' ? 'rejected' : 'waiting') : null,
    (o.flags || []).length ? statusBadge('flag') : null,
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

  const filterSel = select({ id: 'outlet-filter', 'data-test': 'outlet-filter' }, [
    ['unread', `Not read yet (${counts.unread})`],
    ['out', `Out of tolerance (${counts.out})`],
    ['all', `All (${counts.all})`],
  ], st.filter);
  const search = h('input', {
    id: 'outlet-search', type: 'search', 'data-test': 'outlet-search', placeholder: 'Tag or room', autocomplete: 'off', value: st.search || null,
  });
  const list = h('ul', { class: 'list two', 'data-test': 'outlet-list' });
  const countEl = h('p', { class: 'sub', 'aria-live': 'polite' });

  // Only the list is rebuilt while filtering, so the search box keeps focus.
  function paint() {
    const cur = { filter: filterSel.value, search: search.value };
    saveFilter(ctx.jobId, sysId, cur);
    const shown = all.filter((o) => passes(o, cur, pending));
    clear(list);
    const frag = document.createDocumentFragment();
    for (const o of shown) frag.appendChild(item(ctx, o, pending.get(o.id), airUnit));
    list.appendChild(frag);
    countEl.textContent = shown.length === all.length ? `${all.length} outlets` : `${shown.length} of ${all.length} outlets shown`;
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
      h('div', { class: 'form-grid' },
        h('div', { class: 'field' }, h('label', { for: 'outlet-filter' }, 'Show'), filterSel),
        h('div', { class: 'field' }, h('label', { for: 'outlet-search' }, 'Search'), search)),
      countEl,
      list));
}
