// DOM helpers: text goes in as text nodes or attribute values, never markup.

const SVG_NS = 'http://www.w3.org/2000/svg';
// Tags h() makes in the SVG namespace.
const SVG_TAGS = new Set(['svg', 'g', 'circle', 'ellipse', 'line', 'path', 'polyline', 'polygon',
  'rect', 'text', 'tspan', 'defs', 'marker', 'clipPath', 'use']);

function append(el, child) {
  if (child === null || child === undefined || child === false || child === true) return;
  if (Array.isArray(child)) { child.forEach((c) => append(el, c)); return; }
  el.appendChild(child instanceof Node ? child : document.createTextNode(String(child)));
}

function build(el, attrs, children) {
  for (const [k, v] of Object.entries(attrs || {})) {
    if (v === null || v === undefined || v === false) continue;
    if (k === 'on') {
      for (const [ev, fn] of Object.entries(v)) el.addEventListener(ev, fn);
    } else if (k === 'style' && typeof v === 'object') {
      // CSSOM properties are allowed by the CSP; style="" attributes are not.
      Object.assign(el.style, v);
    } else if (k === 'value' && 'value' in el && !(el instanceof SVGElement)) {
      el.value = String(v);
      el.defaultValue = String(v);
    } else {
      el.setAttribute(k, v === true ? '' : String(v));
    }
  }
  append(el, children);
  return el;
}

// h('div', {class: 'x', 'data-test': 'y', on: {click: fn}}, 'text', child, …)
export function h(tag, attrs, ...children) {
  const el = SVG_TAGS.has(tag) ? document.createElementNS(SVG_NS, tag) : document.createElement(tag);
  return build(el, attrs, children);
}

// svg(tag, …): always in the SVG namespace (the chart's title, a).
export const svg = (tag, attrs, ...children) => build(document.createElementNS(SVG_NS, tag), attrs, children);

export function clear(el) {
  while (el.firstChild) el.removeChild(el.firstChild);
  return el;
}

// put / fill append or replace children as h() takes them (null and false
// skipped: the DOM's own append would show them as the text "null").
export const put = (el, ...children) => { append(el, children); return el; };
export const fill = (el, ...children) => put(clear(el), ...children);

// fmt(1234.5) → "1,235"; fmt(null) → "—"; digits by default from the size.
export function fmt(value, digits) {
  if (value === null || value === undefined || value === '' || !Number.isFinite(Number(value))) return '—';
  const v = Number(value);
  if (digits === undefined) {
    const a = Math.abs(v);
    digits = a >= 100 ? 0 : a >= 10 ? 1 : a >= 1 ? 2 : a === 0 ? 0 : 3;
  }
  let f = formatters.get(digits);
  if (!f) {
    f = new Intl.NumberFormat('en-US', { minimumFractionDigits: digits, maximumFractionDigits: digits });
    formatters.set(digits, f);
  }
  return f.format(v);
}
const formatters = new Map(); // one Intl formatter per digits: making one per call is slow on long lists

// parseNumber: "1420", "-0.55", "12,5" (decimal comma), "1,420"; else null.
export function parseNumber(text) {
  let s = String(text ?? '').trim().replace(/\s+/g, '').replace(/^\+/, '');
  if (s === '') return null;
  if (s.includes(',')) {
    if (s.includes('.') || /^-?\d{1,3}(,\d{3})+$/.test(s)) s = s.replace(/,/g, '');
    else s = s.replace(',', '.');
  }
  if (!/^-?(\d+\.?\d*|\.\d+)(e-?\d+)?$/i.test(s)) return null;
  const v = Number(s);
  return Number.isFinite(v) ? v : null;
}

// Status words: a colour is never the only sign, so each status has a symbol
// and a word too.
const STATUS_WORDS = {
  within: ['✓', 'within'],
  low: ['↓', 'low'],
  high: ['↑', 'high'],
  undetermined: ['?', 'undetermined'],
  not_read: ['○', 'not read'],
  waiting: ['…', 'waiting to send'],
  sent: ['↗', 'sent'],
  rejected: ['✕', 'rejected'],
  error: ['!', 'error'],
  flag: ['⚑', 'flagged'],
  meets: ['✓', 'meets'],
  short: ['↓', 'short'],
  no_expected: ['?', 'no expected capacity'],
  incomplete: ['○', 'incomplete'],
  computed: ['✓', 'computed'],
  current: ['✓', 'calibration current'],
  due_soon: ['!', 'calibration due soon'],
  overdue: ['✕', 'calibration overdue'],
  unknown: ['?', 'calibration date unknown'],
  conflict: ['!', 'conflict'],
  agree: ['✓', 'agree'],
  disagree: ['≠', 'disagree'],
  ok: ['✓', 'ok'],
  warning: ['!', 'warning'],
};

export function statusWord(status) {
  return (STATUS_WORDS[status] || ['', String(status || '').replace(/_/g, ' ')])[1];
}

export function statusBadge(status, text) {
  const [sym, word] = STATUS_WORDS[status] || ['•', String(status || 'unknown').replace(/_/g, ' ')];
  return h('span', { class: `badge status-${status}`, 'data-status': status },
    h('span', { class: 'badge-sym', 'aria-hidden': 'true' }, sym), ' ', text || word);
}

// sideLine: where an undetermined value itself lies (the server's words).
export const sideLine = (t, what = 'The value is') => t && t.side_text && h('p', { class: 'scr-side', 'data-test': 'side' }, `${what} ${t.side_text}.`);

// agreeText: a system's outlet sum against its traverse.
export const agreeText = (a, u) => `Outlets ${fmt(a.outlet_sum)} ${u}, traverse ${fmt(a.traverse_flow)} ${u}: ${a.difference_pct > 0 ? '+' : ''}${fmt(a.difference_pct, 1)} % `;

// Cautions, one line each (a tap opens the rest), deferring to the site's rules.
const DEFER = 'The project specification, local codes, the site safety plan and licensed practice govern; where they say more, follow them.';
const CAUTIONS = {
  electrical: ['Live electrical', 'qualified person, arc-rated PPE',
    'Volts and amps on live circuits are taken only by a qualified person; panel and disconnect covers are opened only by a qualified person under the site\'s electrical safety rules (NFPA 70E or the local equivalent), wearing arc-rated PPE and using a meter rated for the circuit.'],
  roof: ['Rooftop', 'use fall protection',
    'Use the fall protection the site requires, keep clear of roof edges, hatches and skylights, and do not carry instruments up a ladder in your hands.'],
  rotating: ['Belts and sheaves', 'lock out first',
    'Lock out and tag out the unit before touching belts, sheaves or guards; rotating equipment can start without warning. Put the guards back before restarting.'],
  hot_water: ['Hot water', 'can scald, open slowly',
    'Hot water and steam piping, valves and test ports can burn and are under pressure. Let the system cool where the work allows, wear gloves and eye protection, and open test ports slowly.'],
  piping: ['Piping', 'under pressure, open slowly',
    'Lines and test ports are under pressure and may be hot. Wear eye protection and gloves and open test ports slowly.'],
  pump: ['Pump', 'never against a closed valve',
    'Do not run a pump against a closed discharge valve (dead-head) for more than a moment: the water in it heats fast and can damage the seal and the pump or burn you. Read shut-off head only as the pump maker and the project specification allow, then open the valve again at once (common practice). Lock out before touching the coupling or guard.'],
  ladder: ['Ladder', 'three points of contact',
    'Set the ladder on firm ground, keep three points of contact and one hand for the ladder; rest the hood or meter, do not reach.'],
};

// onRoof: a system whose work is at height on a roof, by its kind or its
// location ("Roof", "roof curb, level 4").
export const onRoof = (sys) => !!sys && (sys.kind === 'rooftop_unit' || /roof/i.test(sys.location || ''));

export function caution(kind) {
  const [title, short, text] = CAUTIONS[kind] || ['Caution', '', ''];
  return h('details', { class: 'caution', 'data-test': 'caution', 'data-kind': kind },
    h('summary', {}, h('strong', {}, '⚠ ', title, ': '), short),
    h('p', {}, text, ' ', DEFER));
}

let fieldSeq = 0;

// numberField → {el, input}: type=text, inputmode=decimal keeps what is typed
// ("12,"); signed adds a ± key, as a phone's decimal pad may have no minus.
export function numberField({ test, label, unit, value, hint, signed }) {
  const id = `nf-${++fieldSeq}`;
  const input = h('input', {
    id, type: 'text', inputmode: 'decimal', autocomplete: 'off', enterkeyhint: 'done',
    class: 'num-input', 'data-test': test, value: value ?? null, 'aria-describedby': hint ? `${id}-hint` : null,
  });
  const flip = () => {
    const v = input.value.trim();
    input.value = v.startsWith('-') ? v.slice(1) : `-${v}`;
    input.dispatchEvent(new Event('input', { bubbles: true }));
    input.focus();
  };
  const el = h('div', { class: 'num-field' },
    h('label', { for: id }, label),
    h('div', { class: 'num-row' }, input,
      signed && h('button', { type: 'button', class: 'btn secondary sign-key', 'data-test': 'sign-toggle', 'data-for': test, 'aria-label': 'plus or minus', on: { click: flip } }, '±'),
      unit ? h('span', { class: 'num-unit' }, unit) : null),
    hint ? h('div', { class: 'hint', id: `${id}-hint` }, hint) : null);
  return { el, input };
}

// select(attrs, [[value, text]…], selected).
export function select(attrs, options, selected) {
  const el = h('select', attrs, options.map(([v, t]) => h('option', { value: v }, t)));
  if (selected !== undefined && selected !== null) el.value = selected;
  // Remember the chosen value as the default, so main can tell a user's change.
  for (const o of el.options) o.defaultSelected = o.selected;
  return el;
}

export function field(label, control, hint) {
  if (!control.id) control.id = `f-${++fieldSeq}`;
  return h('div', { class: 'field' }, h('label', { for: control.id }, label), control,
    hint ? h('div', { class: 'hint' }, hint) : null);
}

export function button(text, attrs, onClick) {
  return h('button', { type: 'button', class: 'btn', ...attrs, on: { click: onClick } }, text);
}

// jobHash(ctx, 'outlet', id) → "#/job/JOB/outlet/ID".
export function jobHash(ctx, ...parts) {
  return ['#/job', ctx.jobId, ...parts].map((p, i) => (i ? encodeURIComponent(p) : p)).join('/');
}

export function link(text, hash, attrs) {
  return h('a', { href: hash, ...attrs }, text);
}

// clean(el): forget that the user changed a field (after Save), so the next
// re-render is free to show a fresh value.
export function clean(el) {
  if (el && el.dataset) delete el.dataset.dirty;
}

export function timeText(t) {
  if (!t) return 'never';
  const d = new Date(t);
  if (Number.isNaN(d.getTime())) return String(t);
  return d.toLocaleTimeString('en-GB', { hour: '2-digit', minute: '2-digit' });
}

export function agoText(t) {
  const s = Math.max(0, Math.round((Date.now() - new Date(t).getTime()) / 1000));
  if (!Number.isFinite(s)) return '';
  if (s < 60) return `${s} s ago`;
  if (s < 3600) return `${Math.floor(s / 60)} min ago`;
  return `${Math.floor(s / 3600)} h ago`;
}

export function dateTimeText(t) {
  const d = new Date(t);
  if (Number.isNaN(d.getTime())) return String(t || '');
  return d.toLocaleString('en-GB', { day: 'numeric', month: 'short', hour: '2-digit', minute: '2-digit' });
}

// kindWord: a record kind in words, as the trade says them ("as found", "rooftop unit").
export const kindWord = (k) => String(k || '').replace(/_/g, ' ');

// message(kind, text) → a status line; kind "error" is announced to screen readers.
export function message(kind, text, attrs) {
  return h('p', { class: `msg msg-${kind}`, role: kind === 'error' ? 'alert' : 'status', ...attrs }, text);
}
