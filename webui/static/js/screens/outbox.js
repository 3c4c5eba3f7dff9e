// Outbox: every entry this device holds for the job. Rejected entries stay
// here with the server's reason until they are fixed or discarded.

import { h, fmt, statusBadge, parseNumber, button, dateTimeText, kindWord, message, timeText } from '../ui.js';
import { entryLabel } from './entry.js';

const SUBJECTS = { outlet: 'outlets', traverse: 'traverses', capacity_test: 'capacity_tests', water_test: 'water_tests', system: 'systems' };
const SUBJECT_WORDS = { outlet: 'Outlet', traverse: 'Traverse', capacity_test: 'Capacity test', water_test: 'Water test', system: 'System' };

function subjectTag(view, r) {
  const list = (view && view.snapshot && view.snapshot[SUBJECTS[r.subject_kind]]) || [];
  const rec = list.find((x) => x.id === r.subject_id);
  return rec ? rec.tag : '(not in the job any more)';
}

const STATE_TEXT = {
  waiting: 'Waiting to send: it goes when the server answers.',
  sent: 'Sent: kept until the server has it safely on disk.',
  rejected: 'Rejected by the server:',
};

function entryEl(ctx, e) {
  const r = e.reading;
  const what = `${SUBJECT_WORDS[r.subject_kind] || r.subject_kind} ${subjectTag(ctx.view, r)}: ${entryLabel(ctx, r)}`;
  const value = r.void ? 'void' : `${fmt(r.value)} ${ctx.q.label(r.unit)}`;
  const kids = [
    h('div', { class: 'row' }, h('span', { class: 'what grow' }, what), statusBadge(e.state)),
    h('p', {}, h('strong', {}, value), ` · ${kindWord(r.stage)} · ${r.technician} · taken ${dateTimeText(r.taken_at)}`),
    h('p', { class: 'small muted' }, STATE_TEXT[e.state]),
  ];
  if (e.state === 'rejected') {
    const id = `fix-${e.id}`;
    const input = h('input', {
      id, type: 'text', inputmode: 'decimal', autocomplete: 'off', class: 'num-input', 'data-test': 'outbox-fix-value',
      'data-key': e.id, placeholder: r.value === undefined || r.value === null ? '' : String(r.value),
    });
    const err = h('p', { class: 'msg msg-error', role: 'alert', hidden: true });
    kids.push(
      h('p', { class: 'reason', 'data-test': 'outbox-reason' }, e.field ? `${e.reason} (field: ${e.field})` : e.reason),
      h('div', { class: 'field' }, h('label', { for: id }, `Corrected value (${ctx.q.label(r.unit)})`), input),
      err,
      h('div', { class: 'actions' },
        button('Send the corrected value', { 'data-test': 'outbox-fix' }, async () => {
          const v = parseNumber(input.value);
          if (v === null) { err.textContent = 'Type a number.'; err.hidden = false; return; }
          await ctx.outbox.fix(e.id, v);
        }),
        button('Discard', { class: 'btn danger', 'data-test': 'outbox-discard' }, async () => {
          await ctx.outbox.discard(e.id);
        })));
  }
  return h('li', { class: 'entry', 'data-test': 'outbox-entry', 'data-state': e.state, 'data-id': e.id }, kids);
}

export function render(ctx) {
  const entries = ctx.outbox.entries(ctx.jobId);
  const order = { rejected: 0, waiting: 1, sent: 2 };
  entries.sort((a, b) => order[a.state] - order[b.state] || a.created - b.created);
  const c = ctx.outbox.counts(ctx.jobId);
  const s = ctx.sync.status();
  const others = ctx.outbox.entries().length - entries.length;

  return h('div', { 'data-test': 'outbox' },
    h('div', { class: 'screen-head' },
      h('h1', {}, 'Outbox'),
      h('p', { class: 'sub' }, `${c.waiting} waiting · ${c.sent} sent · ${c.rejected} rejected · last contact ${timeText(s.lastContact)}`)),
    s.online ? null : message('info', 'Offline: entries are kept on this device and sent when the server answers again.'),
    s.error ? message('info', `Last problem talking to the server: ${s.error}`) : null,
    h('div', { class: 'actions' }, button('Send now', { class: 'btn secondary', 'data-test': 'outbox-send' }, () => ctx.sync.kick())),
    h('section', { class: 'card' },
      entries.length
        ? h('ul', { class: 'list' }, entries.map((e) => entryEl(ctx, e)))
        : h('p', { 'data-test': 'outbox-empty' }, 'Nothing waiting: every entry from this device is on the server.')),
    others > 0 ? message('info', `${others} more entries belong to other jobs on this device.`) : null);
}
