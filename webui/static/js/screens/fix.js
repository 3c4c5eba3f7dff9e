// Mistakes: correct or void a reading (a new reading naming the one it
// supersedes: nothing is overwritten), the history of every value, and the
// question asked before a value far from design or its neighbours is sent.
import { h, fmt, numberField, parseNumber, dateTimeText, kindWord, statusBadge, message, put } from '../ui.js';
import { enc } from '../api.js';

const T = (r) => Date.parse(r.taken_at) || 0;

// live: the view sync holds now (ctx.view: the one drawn from).
export const live = (ctx) => (ctx.sync && ctx.sync.jobId() === ctx.jobId && ctx.sync.view()) || ctx.view;

// pendingOf: this device's entries of a subject the view does not reflect yet.
export function pendingOf(ctx, kind, id) {
  const v = live(ctx), have = new Set((v.snapshot.readings || []).map((r) => r.id)), seq = (v.job && v.job.seq) || 0;
  return ctx.outbox.forSubject(ctx.jobId, kind, id)
    .filter((e) => e.state !== 'rejected' && !have.has(e.id) && !(e.state === 'sent' && e.seq && e.seq <= seq));
}

// head: the reading that counts (or will, once sent) at a point and stage: the
// latest of the view's and this device's pending ones, less those corrected.
export function head(ctx, kind, id, qtys, point, stage) {
  const pend = pendingOf(ctx, kind, id).map((e) => e.reading);
  const gone = new Set(pend.map((r) => r.supersedes).filter(Boolean));
  let best = null;
  for (const r of [...(live(ctx).snapshot.readings || []), ...pend]) {
    if (r.subject_id !== id || !qtys.includes(r.quantity) || (r.point || 0) !== point || r.stage !== stage || r.void || gone.has(r.id)) continue;
    if (!best || T(r) >= T(best)) best = r;
  }
  return best;
}

// far: why v is more than 3× or under ⅓ of ref ('' when not): common practice
// for catching a slip (a digit too many, the wrong unit), not a tolerance.
export function far(v, ref, what) {
  if (!(ref > 0) || !Number.isFinite(v)) return '';
  const r = Math.abs(v) / ref;
  return r > 3 ? `more than 3 times ${what}` : r < 1 / 3 ? `less than a third of ${what}` : '';
}

// band: why v is outside lo…hi × ref.
export function band(v, ref, lo, hi, what) {
  if (!(ref > 0) || !Number.isFinite(v)) return '';
  return v > ref * hi ? `more than ${fmt((hi - 1) * 100, 0)} % above ${what}` : v < ref * lo ? `more than ${fmt((1 - lo) * 100, 0)} % below ${what}` : '';
}

export function median(xs) {
  const s = [...xs].sort((a, b) => a - b), n = s.length;
  return n ? (n % 2 ? s[(n - 1) / 2] : (s[n / 2 - 1] + s[n / 2]) / 2) : NaN;
}

// noteInput: the reading's remark (the store takes 500 characters).
export const noteInput = (test, label = 'Remark (optional)') => {
  const i = h('input', { type: 'text', maxlength: 500, autocomplete: 'off', 'data-test': test, placeholder: 'e.g. damper ½ open, access panel missing' });
  return { input: i, el: h('label', { class: 'field' }, h('span', { class: 'label' }, label), i) };
};

// ask: the reasons and two buttons; true sends anyway (confirmed).
export function ask(box, reasons) {
  return new Promise((done) => {
    const b = (t, test, cls, v) => h('button', { type: 'button', class: `btn ${cls}`, 'data-test': test, on: { click: () => { box.replaceChildren(); done(v); } } }, t);
    box.replaceChildren(h('div', { class: 'scr-msg scr-msg-warn', role: 'alert', 'data-test': 'confirm-far' },
      h('strong', {}, 'Check this value before it is sent'), h('ul', {}, reasons.map((r) => h('li', {}, r))),
      h('p', { class: 'hint' }, 'If it is right, say why in the remark: the report shows it as confirmed.'),
      h('div', { class: 'actions' }, b('Send it, it is right', 'confirm-yes', 'big', true), b('Change it', 'confirm-no', 'secondary', false))));
    const y = box.querySelector('[data-test=confirm-yes]');
    if (y) y.focus({ preventScroll: true });
    box.scrollIntoView({ block: 'nearest' });
  });
}


let editing = null; // {id, mode: 'correct' | 'void'}: the open form, kept across re-renders

// openFix: the form, its field focused (the app's redraw keeps the old focus).
export async function openFix(ctx, id, mode, where) {
  editing = { id, mode, where };
  await ctx.rerender();
  const f = document.querySelector('[data-test=fix-form] [autofocus]');
  if (f) f.focus();
}

export const fixButtons = (ctx, r, where = 'screen') => h('span', { class: 'fix-btns' },
  h('button', { type: 'button', class: 'btn secondary', 'data-test': 'correct', 'data-id': r.id, on: { click: () => openFix(ctx, r.id, 'correct', where) } }, 'Correct'),
  h('button', { type: 'button', class: 'btn danger', 'data-test': 'void', 'data-id': r.id, on: { click: () => openFix(ctx, r.id, 'void', where) } }, 'Void'));

// fixForm: the open correction or void of r, or null; check(v, r) as far().
export function fixForm(ctx, r, { label, check, signed, where = 'screen' } = {}) {
  if (!r || !editing || editing.id !== r.id || editing.where !== where) return null;
  const unit = ctx.q.label(r.unit);
  const isVoid = editing.mode === 'void';
  const was = r.void ? 'void' : `${fmt(r.value)} ${unit}`;
  const val = isVoid ? null : numberField({ test: 'fix-value', label: `Right value${label ? ` of ${label}` : ''} (was ${was})`, unit, signed });
  const note = noteInput('fix-note', isVoid ? 'Why void it? (goes in the report)' : 'Remark (optional)');
  const box = h('div', { 'aria-live': 'polite' });
  const cancel = () => { editing = null; ctx.rerender(); };
  const send = async (extra) => {
    await ctx.outbox.add(ctx.jobId, {
      subject_kind: r.subject_kind, subject_id: r.subject_id, quantity: r.quantity, point: r.point || 0, unit: r.unit,
      stage: r.stage, instrument_id: r.instrument_id || '', supersedes: r.id, note: note.input.value.trim(), ...extra,
    });
    editing = null;
    ctx.rerender();
  };
  const save = async () => {
    if (isVoid) {
      if (!note.input.value.trim()) { box.replaceChildren(message('error', 'Say why it is void: the report shows the reason.')); note.input.focus(); return; }
      return send({ void: true, value: null });
    }
    const v = parseNumber(val.input.value);
    if (v === null) { box.replaceChildren(message('error', val.input.value.trim() ? 'That is not a number.' : 'Type the right value first.')); val.input.focus(); return; }
    const reasons = check ? check(v, r).filter(Boolean).map((x) => `${fmt(v)} ${unit} is ${x}.`) : [];
    const confirmed = reasons.length > 0;
    if (confirmed && !(await ask(box, reasons))) { val.input.focus(); return; }
    return send({ value: v, confirmed });
  };
  if (val) val.input.setAttribute('autofocus', '');
  else note.input.setAttribute('autofocus', '');
  return h('div', { class: 'fix-form', 'data-test': 'fix-form', 'data-mode': editing.mode, 'data-id': r.id },
    h('p', { class: 'hint' }, isVoid
      ? `Void ${was} (${kindWord(r.stage)}): it stops counting; the report keeps it with your reason.`
      : `The new value replaces ${was} (${kindWord(r.stage)}); the report keeps both.`),
    val && val.el, note.el, box,
    h('div', { class: 'actions' },
      h('button', { type: 'button', class: `btn big${isVoid ? ' danger' : ''}`, 'data-test': 'fix-save', on: { click: save } }, isVoid ? 'Void it' : 'Save correction'),
      h('button', { type: 'button', class: 'btn secondary', 'data-test': 'fix-cancel', on: { click: cancel } }, 'Cancel')));
}

// lineName: a three-phase reading's conductors. Volts are read line to line
// (L1–L2, L2–L3, L3–L1), amps on each line (L1, L2, L3).
export const lineName = (qty, n) => (qty === 'volts' ? ['L1–L2', 'L2–L3', 'L3–L1'][n - 1] || `L${n}` : `L${n}`);

// entryLabel: what a reading is of, e.g. "motor amps, L2" (the outbox screen shows it too).
// The fan screen's words for the two fan statics (an exhaust fan has no
// "return"); the quantity codes stay.
const SAYS = { static_supply: 'fan discharge static pressure', static_return: 'fan inlet (suction) static pressure' };
export function entryLabel(ctx, r) {
  const d = (r.subject_kind === 'system' && SAYS[r.quantity]) || ctx.q.describe(r.subject_kind, r.quantity).replace(/ at a traverse point$|, per leg or single$/, '');
  return d + (!r.point ? '' : r.subject_kind === 'system' ? `, ${lineName(r.quantity, r.point)}` : `, point ${r.point}`);
}

const all = new Map(); // job → {list, at, err}: every reading, as GET /readings gives them

async function loadAll(ctx) {
  const job = ctx.jobId, m = all.get(job) || {};
  if (m.busy) return;
  all.set(job, { ...m, busy: true });
  try {
    const res = await ctx.api.get(`/jobs/${enc(job)}/readings`);
    all.set(job, { list: res.readings || [], at: Date.now() });
  } catch (e) {
    all.set(job, { ...m, err: e.message, busy: false });
  }
  ctx.rerender();
}

function known(ctx, kind, id) {
  const m = new Map();
  const add = (r, state) => { if (r.subject_kind === kind && r.subject_id === id && !m.has(r.id)) m.set(r.id, { r, state }); };
  const mine = ctx.outbox.forSubject(ctx.jobId, kind, id);
  for (const e of mine) if (e.state !== 'sent') add(e.reading, e.state);
  for (const r of (all.get(ctx.jobId) || {}).list || []) add(r, 'stored');
  for (const r of live(ctx).snapshot.readings || []) add(r, 'stored');
  for (const e of mine) add(e.reading, e.state);
  for (const e of ctx.outbox.deliveredFor(ctx.jobId, kind, id)) add(e.reading, 'stored');
  return [...m.values()];
}

// historyView: every reading of a subject, newest first: who, when, with
// what, which counts and what superseded what; Correct and Void on current
// ones. Open while this device holds entries not in the view (a new data-key
// keeps the app from restoring it closed).
export function historyView(ctx, kind, id, { label = (r) => entryLabel(ctx, r), check, signed } = {}) {
  const list = known(ctx, kind, id).sort((a, b) => T(b.r) - T(a.r));
  const busy = list.some((x) => x.state !== 'stored');
  const by = new Map();
  for (const x of list) if (x.r.supersedes) by.set(x.r.supersedes, x.r);
  const inst = new Map((ctx.view.snapshot.instruments || []).map((i) => [i.id, i.tag]));
  const m = all.get(ctx.jobId) || {};
  const d = h('details', { class: 'card history', 'data-test': 'history', 'data-key': busy ? 'busy' : '', open: busy },
    h('summary', {}, h('strong', {}, 'History'), ` (${list.length} ${list.length === 1 ? 'reading' : 'readings'})`));
  d.addEventListener('toggle', () => { if (d.open && (!m.at || Date.now() - m.at > 5000)) loadAll(ctx); });
  const unit = (r) => ctx.q.label(r.unit);
  put(d,
    m.err && !m.list ? message('info', `The full history needs the server (${m.err}).`) : null,
    !list.length ? h('p', { class: 'hint' }, 'Nothing read yet.') : null,
    h('ol', { class: 'hist' }, list.map(({ r, state }) => {
      const next = by.get(r.id);
      const counts = !r.void && !next && state !== 'rejected';
      const what = `${label(r)}, ${kindWord(r.stage)}`;
      const value = r.void ? 'void' : `${fmt(r.value)} ${unit(r)}`;
      const fate = state === 'rejected' ? h('a', { href: `#/job/${enc(ctx.jobId)}/outbox` }, statusBadge('rejected', `rejected: ${(ctx.outbox.get(r.id) || {}).reason || ''}`))
        : next ? statusBadge('superseded', next.void ? 'voided' : `corrected to ${fmt(next.value)} ${unit(next)}`)
          : r.void ? statusBadge('void', 'void') : state !== 'stored' ? statusBadge(state) : statusBadge('counts', 'counts');
      return h('li', { class: counts ? '' : 'hist-old', 'data-test': 'history-item', 'data-id': r.id, 'data-counts': String(counts) },
        h('div', { class: 'hist-head' }, h('span', { class: 'hist-what' }, what), h('strong', { class: 'hist-val' }, value), fate),
        h('div', { class: 'small muted' }, [r.technician || 'this device', dateTimeText(r.taken_at), inst.get(r.instrument_id) || 'no instrument',
          r.confirmed && 'confirmed far from design', r.supersedes && (r.void ? 'voids an earlier value' : 'corrects an earlier value')].filter(Boolean).join(' · ')),
        r.note ? h('div', { class: 'hist-note' }, r.void ? `Reason: ${r.note}` : `Remark: ${r.note}`) : null,
        counts && (fixForm(ctx, r, { label: label(r), check, signed, where: 'history' }) || fixButtons(ctx, r, 'history')));
    })));
  return d;
}
