// Set up the job (lead): the job's own data, then each system with its
// outlets, traverses and tests, and the instruments, each with Edit and Add.

import { h, kindWord, jobHash } from '../ui.js';

const byTag = (a, b) => a.tag.localeCompare(b.tag, undefined, { numeric: true });
const edit = (ctx, kind, id, q) => jobHash(ctx, 'edit', kind, id) + (q ? `?system=${encodeURIComponent(q)}` : '');
const add = (ctx, kind, what, sys) => h('a', { class: 'btn secondary', href: edit(ctx, kind, 'new', sys), 'data-test': `add-${kind}` }, `Add ${what}`);

function list(ctx, kind, recs, text) {
  return recs.length ? h('ul', { class: 'list' }, [...recs].sort(byTag).map((r) => h('li', {},
    h('a', { class: 'item', href: edit(ctx, kind, r.id), 'data-test': `edit-${kind}`, 'data-tag': r.tag },
      h('span', { class: 'tag' }, r.tag), h('span', { class: 'room' }, text(r)))))) : null;
}

export function render(ctx) {
  if (ctx.role !== 'lead') {
    return h('section', { class: 'card', 'data-test': 'lead-denied' }, h('h2', {}, 'For the lead'), h('p', {}, 'Ask your lead to set up the job in the app.'));
  }
  const { job, snapshot: s } = ctx.view;
  const of = (k, id) => (s[k] || []).filter((r) => r.system_id === id);
  return h('div', { class: 'setup', 'data-test': 'setup-screen' },
    h('div', { class: 'screen-head' }, h('h1', {}, 'Set up the job'), h('p', { class: 'sub' }, job.name)),
    h('section', { class: 'card' },
      h('p', {}, [job.project_number && `Project ${job.project_number}`, job.site_address, job.units === 'si' ? 'SI units' : 'IP units'].filter(Boolean).join(' · ')),
      h('div', { class: 'actions' }, h('a', { class: 'btn secondary', href: jobHash(ctx, 'edit', 'job'), 'data-test': 'edit-job' }, 'Edit the job'),
        h('a', { class: 'btn secondary', href: jobHash(ctx, 'lead') }, 'Join codes and schedule import'))),
    h('div', { class: 'cols' },
      h('div', {},
        [...(s.systems || [])].sort(byTag).map((y) => h('section', { class: 'card', 'data-test': 'setup-system', 'data-tag': y.tag },
          h('h2', {}, `${y.tag} · ${y.name || kindWord(y.kind)}`),
          h('a', { class: 'btn secondary', href: edit(ctx, 'system', y.id), 'data-test': 'edit-system', 'data-tag': y.tag }, `Edit ${y.tag}: design and nameplate`),
          h('details', { open: of('outlets', y.id).length <= 12 }, h('summary', {}, `Outlets (${of('outlets', y.id).length})`),
            list(ctx, 'outlet', of('outlets', y.id), (o) => `${o.room || ''} · ${kindWord(o.kind)}`)),
          list(ctx, 'traverse', of('traverses', y.id), (t) => `Traverse · ${t.location || ''}`),
          list(ctx, 'capacity_test', of('capacity_tests', y.id), (t) => `Capacity test · ${t.mode}`),
          list(ctx, 'water_test', of('water_tests', y.id), (t) => `Water test · ${t.mode || 'cooling or heating not stated'}`),
          h('div', { class: 'actions' }, add(ctx, 'outlet', 'outlet', y.id), add(ctx, 'traverse', 'traverse', y.id),
            add(ctx, 'capacity_test', 'capacity test', y.id), add(ctx, 'water_test', 'water test', y.id)))),
        h('section', { class: 'card' }, h('div', { class: 'actions' }, add(ctx, 'system', 'a system')))),
      h('div', {}, h('section', { class: 'card' }, h('h2', {}, 'Instruments'),
        list(ctx, 'instrument', s.instruments || [], (i) => `${kindWord(i.kind)}${i.calibration_due ? ` · due ${i.calibration_due}` : ''}`),
        h('div', { class: 'actions' }, add(ctx, 'instrument', 'an instrument'))))));
}
