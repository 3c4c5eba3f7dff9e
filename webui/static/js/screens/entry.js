// Shared parts of the test screens: entries that survive a re-render, posting
// through the outbox, and result rows. Every figure is the server's.
import { h, fmt, statusBadge, numberField, parseNumber, put, kindWord, sideLine } from '../ui.js';
import { store } from '../store.js';
import { head, ask, noteInput, live } from './fix.js';

// Per-screen state kept while the app is open: typed values, stage, instruments.
const states = new Map();
export function screenState(ctx, kind, id, extra) {
  const key = `${kind}:${ctx.jobId}:${id}`;
  if (!states.has(key)) states.set(key, { kind, id, values: {}, inst: {}, stage: defaultStage(ctx, kind, id), ...extra });
  return states.get(key);
}

export { put, fill } from '../ui.js';

export const jobUnits = (ctx) => (ctx.view.job && ctx.view.job.units) || 'ip';
export const snap = (ctx) => live(ctx).snapshot || {};
export const results = (ctx) => live(ctx).results || {};
export const rUnits = (ctx) => results(ctx).units || {};
export const byId = (list, id) => (list || []).find((x) => x.id === id) || null;
export const unitFor = (ctx, kind, qty) => ctx.q.unitFor(kind, qty, jobUnits(ctx));
export const unitLabel = (ctx, code) => ctx.q.label(code);
// asEntered: a typed value without float noise (0.125, not 0.12499…).
export const asEntered = (v) => (Number.isFinite(v) ? Number(v.toPrecision(6)).toLocaleString('en-US', { maximumFractionDigits: 6 }) : '—');
export const num = (v, digits, unit) => (Number.isFinite(v) ? `${fmt(v, digits)}${unit ? ' ' + unit : ''}` : '—');
// power: "120,000 Btu/h (120 MBH, 10.0 tons)" or "35,170 W (35.2 kW)"; a ton
// is 12,000 Btu/h, and tons are for cooling only (a heating coil says MBH).
export const power = (v, u, cooling) => (Number.isFinite(v) ? `${num(v, 0, u)} (${u === 'W' ? num(v / 1000, 1, 'kW') : `${num(v / 1000, 1, 'MBH')}${cooling ? `, ${num(v / 12000, 1, 'tons')}` : ''}`})` : '—');

// field: a numeric entry bound to st.values[test]; check(v) says why a value
// is far off ('' when not); signed adds the ± key, which every temperature
// has too (a winter heating test reads below zero).
export function field(ctx, st, { test, label, kind, qty, point = 0, hint, inst, check, signed }) {
  const unit = unitFor(ctx, kind, qty);
  const spec = ctx.q.spec(kind, qty);
  if (signed === undefined && spec && spec.dimension === 'temperature') signed = true;
  const f = numberField({ test, label, unit: unitLabel(ctx, unit), value: st.values[test] ?? '', hint: hint || undefined, signed });
  f.input.addEventListener('input', () => { st.values[test] = f.input.value; });
  return { el: f.el, input: f.input, test, qty, point, unit, unitText: unitLabel(ctx, unit), label, inst, check };
}

const pick = (label, sel) => h('label', { class: 'scr-pick' }, h('span', { class: 'scr-pick-label' }, label), sel);

export function stageSelect(st, onChange) {
  const sel = h('select', { 'data-test': 'stage' }, h('option', { value: 'as_found' }, 'as found'), h('option', { value: 'final' }, 'final'));
  sel.value = st.stage;
  sel.addEventListener('change', () => { st.stage = sel.value; onChange(); });
  return pick('Stage', sel);
}

// defaultStage: the stage of this device's last entry, else final once read final.
function defaultStage(ctx, kind, id) {
  const mine = ctx.outbox.forSubject(ctx.jobId, kind, id);
  if (mine.length) return mine[mine.length - 1].reading.stage;
  return (snap(ctx).readings || []).some((r) => r.subject_id === id && r.stage === 'final') ? 'final' : 'as_found';
}

// instrumentSelect: the pick st.inst[group], fitting kinds first; by default
// the last used of those kinds here, else the first fitting one not overdue.
export function instrumentSelect(ctx, st, group, kinds, { label = 'Instrument', test = 'instrument' } = {}) {
  const cal = (i) => (byId(results(ctx).instruments, i.id) || {}).calibration_status;
  const fits = (i) => kinds.includes(i.kind);
  const list = [...(snap(ctx).instruments || [])].sort((a, b) => fits(b) - fits(a) || String(a.tag).localeCompare(String(b.tag)));
  if (st.inst[group] === undefined) {
    const last = kinds.map((k) => store.metaSync(`instrument:${k}`)).find((id) => byId(list, id));
    const fit = list.find((i) => fits(i) && cal(i) !== 'overdue');
    st.inst[group] = last || (fit ? fit.id : '');
  }
  const calWords = { overdue: ' (calibration overdue)', due_soon: ' (calibration due soon)' };
  const opt = (i) => h('option', { value: i.id }, `${i.tag} · ${String(i.kind).replace(/_/g, ' ')}${calWords[cal(i)] || ''}`);
  // The kinds that read this come first; the rest stay at hand, set apart.
  const others = list.filter((i) => !fits(i));
  const sel = h('select', { 'data-test': test }, h('option', { value: '' }, 'no instrument'),
    list.filter(fits).map(opt),
    others.length ? h('optgroup', { label: 'Other instruments' }, others.map(opt)) : null);
  sel.value = st.inst[group];
  st.inst[group] = sel.value;
  sel.addEventListener('change', () => {
    const i = byId(list, sel.value);
    st.inst[group] = sel.value;
    if (i) store.setMeta(`instrument:${i.kind}`, i.id).catch(() => {});
  });
  return pick(label, sel);
}

// collect reads the filled fields, marking those that are not numbers.
export function collect(fields) {
  const items = [];
  let bad = false;
  for (const f of fields) {
    const text = f.input.value.trim();
    const v = text === '' ? null : parseNumber(text);
    const wrong = text !== '' && v === null;
    f.input.setAttribute('aria-invalid', String(wrong));
    bad = bad || wrong;
    if (v !== null) items.push({ f, value: v });
  }
  return { items, bad };
}

// post writes the items to the outbox in one transaction. Their entries are
// cleared first, so a redraw meanwhile cannot bring one back to save twice.
export async function post(ctx, st, kind, subjectId, items, extra = {}) {
  const typed = items.map(({ f }) => [f, f.input.value]);
  for (const [f] of typed) {
    delete st.values[f.test];
    f.input.value = '';
    delete f.input.dataset.dirty;
  }
  try {
    await ctx.outbox.addMany(ctx.jobId, items.map(({ f, value, supersedes, ...more }) => ({
      subject_kind: kind, subject_id: subjectId, quantity: f.qty, point: f.point, value, unit: f.unit, stage: st.stage,
      instrument_id: st.inst[f.inst] || '', supersedes: supersedes || '', void: false, note: '', ...extra, ...more,
    })));
  } catch (e) {
    for (const [f, v] of typed) { f.input.value = v; st.values[f.test] = v; }
    throw e;
  }
}

// farReasons: why any item is far off, each said with its label.
export const farReasons = (items) => items.map(({ f, value }) => {
  const why = f.check && f.check(value);
  return why ? `${f.label}: ${asEntered(value)} ${f.unitText} is ${why}.` : '';
}).filter(Boolean);

// noteLine: beside a Save button; st.msg shows a few seconds.
export function noteLine(test, st) {
  const p = h('p', { class: 'msg msg-info', 'data-test': test, role: 'status', 'aria-live': 'polite' });
  if (st && st.msg && Date.now() - st.msgAt < 8000) p.textContent = st.msg;
  return p;
}

export { entryLabel } from './fix.js';
export { head };

// latest: the view's reading that counts at a point and stage ('' any), or null.
export function latest(ctx, id, qtys, point, stage) {
  let best = null;
  for (const r of snap(ctx).readings || []) {
    if (r.subject_id !== id || !qtys.includes(r.quantity) || (r.point || 0) !== point || (stage && r.stage !== stage) || r.void) continue;
    if (!best || r.taken_at > best.taken_at || (r.taken_at === best.taken_at && r.seq > best.seq)) best = r;
  }
  return best;
}

// nowHint: "now 72 °F (final)", the stored reading a new entry would follow.
export function nowHint(ctx, id, qty, point, stage) {
  const r = latest(ctx, id, [qty], point, stage) || latest(ctx, id, [qty], point, '');
  return r && Number.isFinite(r.value) ? `now ${asEntered(r.value)} ${unitLabel(ctx, r.unit)} (${kindWord(r.stage)})` : '';
}

const WORDS = {
  within: 'within tolerance', low: 'low: below the band', high: 'high: above the band',
  undetermined: 'undetermined with this instrument', meets: 'meets the expected capacity',
  short: 'short of the expected capacity', no_expected: 'no expected capacity on record',
  conflict: 'conflict: two readings of a point',
};
export const badge = (status) => statusBadge(status, WORDS[status]);

export const row = (label, value, test) => h('div', { class: 'scr-row', 'data-test': test || null },
  h('span', { class: 'scr-k' }, label), h('span', { class: 'scr-v' }, value ?? '—'));

// pmText: ", reading ± 20 cfm"; no ± (not ± 0) with no instrument accuracy on record.
export const pmText = (t, unit, d = 0) => (t.uncertainty_unknown ? ', no instrument accuracy on record' : t.uncertainty ? `, reading ± ${fmt(t.uncertainty, d)} ${unit}` : '');

// tolerance: "98.7 % of design (band 3,800 to 4,400 cfm, reading ± 20 cfm)".
export function tolerance(tol, unit, d = 0) {
  // The figures on a line of their own: after the badge's words they read
  // as one sentence ("below the band 16.9 % of design").
  return tol && h('div', { class: 'scr-tol' }, badge(tol.status),
    h('div', {}, `${fmt(tol.percent_of_design, 1)} % of design (band ${fmt(tol.low, d)} to ${fmt(tol.high, d)} ${unit}${pmText(tol, unit, d)})`), sideLine(tol));
}

const msgBox = (list, cls, title, test) => list && list.length > 0 && h('div', { class: `scr-msg ${cls}`, 'data-test': test },
  h('strong', {}, title), h('ul', {}, list.map((t) => h('li', {}, typeof t === 'string' ? t : t.text))));

// messages: errors, warnings, flags and notes as plain lists.
export const messages = (res) => h('div', { class: 'scr-msgs' },
  msgBox(res.errors, 'scr-msg-error', 'Errors', 'result-errors'), msgBox(res.warnings, 'scr-msg-warn', 'Warnings', 'result-warnings'),
  msgBox(res.flags, 'scr-msg-warn', 'Flags', 'result-flags'), msgBox(res.notes, 'scr-msg-note', 'Notes', 'result-notes'));

// missingList: the inputs the server still needs, in words.
export function missingList(list, words) {
  const say = (t) => t.replace(/\b[a-z]+_[a-z_]+\b|\b(flow|dp)\b/g, (m) => words[m] || m);
  return msgBox(list && list.map(say), 'scr-msg-note', 'Still needed', 'result-missing');
}

// header: title and subtitle (main's top bar has the way back).
export const header = (title, sub) => h('header', { class: 'screen-head' }, h('h1', { 'data-test': 'screen-tag' }, title), sub && h('p', { class: 'sub' }, sub));

export const notFound = (root, what) => put(root, header(`${what} not found`, 'It may have been deleted; go back to the job.'));

// saveButton: disabled while the outbox write runs, so a double tap saves once.
export function saveButton(test, text, onSave) {
  const b = h('button', { type: 'button', class: 'btn big', 'data-test': test }, text);
  b.addEventListener('click', async () => {
    if (b.disabled) return;
    b.disabled = true;
    try { await onSave(); } finally { b.disabled = false; }
  });
  return b;
}

// saveRow: the remark and Save button of a group of fields; a value far off
// is asked about first; done() redraws the form.
export function saveRow(ctx, st, { test, text = 'Save readings', kind, id, fs, note, done }) {
  const rm = noteInput(`${test}-note`);
  const box = h('div', { 'aria-live': 'polite' });
  return h('div', {}, rm.el, box, h('div', { class: 'scr-actions' },
    saveButton(test, text, async () => {
      const { items, bad } = collect(fs);
      if (bad || !items.length) { note.textContent = bad ? 'A marked entry is not a number.' : 'Nothing typed yet.'; return; }
      const far = farReasons(items);
      if (far.length && !(await ask(box, far))) return;
      await post(ctx, st, kind, id, items, { note: rm.input.value.trim(), confirmed: far.length > 0 });
      rm.input.value = '';
      st.msg = `${items.length} saved on this device.`;
      st.msgAt = Date.now();
      done();
    })));
}

// resultCard: the result area, or a line saying the server has not answered.
export const resultCard = (test, status, res, body) => put(
  h('div', { class: 'card scr-result', 'data-test': test, 'data-status': res ? status : 'waiting' }, h('h2', {}, 'Result')),
  res ? body() : h('p', { class: 'hint' }, 'No result from the server yet.'));
