// Traverse screen: a duct plane read point by point with a pitot tube (or an
// anemometer). Point positions, velocities and the flow all come from the
// server's results; the app only shows them and posts readings.
import { h, caution, onRoof, kindWord, fmt, timeText } from '../ui.js';
import { s } from '../chart.js';
import {
  screenState, snap, results, rUnits, byId, field, stageSelect, instrumentSelect, collect, post, head,
  badge, row, num, tolerance, messages, header, saveButton, noteLine, nowHint, unitLabel, asEntered,
  put, fill, saveRow, resultCard, notFound, farReasons,
} from './entry.js';
import { historyView, far, median, ask, noteInput, fixForm, openFix } from './fix.js';

const DENSITY = { measured: 'from the air read at the plane', standard: 'standard air (no dry bulb read)', dry_air: 'dry air at the plane dry bulb (no RH or wet bulb)' };
const PT = ['vp', 'velocity'];

// pointName: "Line 2, point 3".
const pointName = (p) => {
  const m = /^(line|diameter) (\d+) point (\d+)$/.exec(p.label) || [];
  return m[1] ? `${m[1] === 'line' ? 'Line' : 'Diameter'} ${m[2]}, point ${m[3]}` : `Point ${p.point}`;
};

// pointWords: "Line 2, point 3: 12.0 in from the wall (port 3.5 in from the corner)".
export function pointWords(p, len) {
  const d = len === 'mm' ? 0 : 1;
  return `${pointName(p)}: ${fmt(p.depth, d)} ${len} from the wall` +
    (p.port_offset !== undefined ? ` (port ${fmt(p.port_offset, d)} ${len} from the corner)` : '');
}

// pointStates: per point and stage, the reading that counts (a point in the
// outbox stays read until the view has it), its line and velocity.
function pointStates(ctx, st, tr, res) {
  const same = res && res.stage === st.stage;
  return ((res && res.points) || []).map((p) => {
    const hd = head(ctx, 'traverse', tr.id, PT, p.point, st.stage);
    const inView = hd && (snap(ctx).readings || []).some((r) => r.id === hd.id);
    const m = /^(?:line|diameter) (\d+)/.exec(p.label);
    return { ...p, stored: hd, pending: !!hd && !inView, read: !!hd, line: m ? Number(m[1]) : 1, velocity: same ? p.velocity : undefined };
  });
}

// lineCheck: a value far from the median of the other points read on its line
// (two at least): a slip more often than a real profile (common practice).
function lineCheck(states, p, qty) {
  const others = states.filter((x) => x.line === p.line && x.point !== p.point && x.stored && x.stored.quantity === qty && Number.isFinite(x.stored.value));
  return others.length < 2 ? () => '' : (v) => far(v, median(others.map((x) => Math.abs(x.stored.value))), 'the median of the other points on its line');
}

// nextUnread: the next point not read after from; all read (a second pass): the next one.
function nextUnread(states, from) {
  const n = states.length;
  for (let i = 1; i <= n; i++) if (!states[(from - 1 + i) % n].read) return states[(from - 1 + i) % n].point;
  return (from % n) + 1;
}

// grid draws the plane to scale, each point read, waiting or not; velocities
// (14 px) where the neighbours leave room, else on the point buttons only.
function grid(tr, states, current, onPick) {
  const W = 320;
  const svg = s('svg', { class: 'tgrid', 'data-test': 'traverse-grid', 'aria-hidden': 'true' });
  // (vx, vy): where the velocity goes from the dot.
  const dot = (p, cx, cy, room, vx = 0, vy = 20, lx = cx + vx) => {
    const state = p.conflict ? 'conflict' : p.pending && !p.stored ? 'waiting' : p.read ? 'read' : 'unread';
    return s('g', {
      class: `tp tp-${state}`, 'data-test': 'grid-point', 'data-point': p.point, 'data-state': state, 'aria-hidden': 'true', on: { click: () => onPick(p.point) },
    }, s('circle', { cx, cy, r: 14, class: 'tp-hit' }),
    p.point === current && s('circle', { cx, cy, r: 11, class: 'tp-ring' }),
    s('circle', { cx, cy, r: 6.5, class: 'tp-dot' }),
    room && Number.isFinite(p.velocity) && s('text', { x: lx, y: cy + vy, class: 'tp-vel', 'text-anchor': vx ? 'start' : 'middle' }, fmt(p.velocity, 0)));
  };
  if (tr.shape === 'round') {
    const R = W / 2 - 22, c = W / 2, k = R / (tr.diameter / 2), nd = Math.max(1, tr.diameters);
    svg.setAttribute('viewBox', `0 0 ${W} ${W}`);
    svg.appendChild(s('circle', { cx: c, cy: c, r: R, class: 'tduct' }));
    // Diameter d is entered from the left (1), then turning clockwise.
    const dir = (d) => [Math.cos(Math.PI + (d * Math.PI) / nd), Math.sin(Math.PI + (d * Math.PI) / nd)];
    for (let d = 0; d < nd; d++) {
      const [ux, uy] = dir(d);
      svg.append(s('line', { x1: c + ux * R, y1: c + uy * R, x2: c - ux * R, y2: c - uy * R, class: 'tline' }),
        s('text', { x: c + ux * (R + 12), y: c + uy * (R + 12) + 4, class: 'tlabel', 'text-anchor': 'middle' }, String(d + 1)));
    }
    const at = states.map((p, i) => {
      const m = /^diameter (\d+)/.exec(p.label);
      const [ux, uy] = dir((m ? Number(m[1]) : Math.floor(i / tr.points_per_diameter) + 1) - 1);
      const r = R - p.depth * k; // from the entry wall through the centre
      return { p, cx: c + ux * r, cy: c + uy * r, steep: Math.abs(uy) > 0.7 };
    });
    for (const a of at) {
      const near = Math.min(...at.filter((b) => b !== a).map((b) => Math.hypot(b.cx - a.cx, b.cy - a.cy)));
      // A label by a near-wall point is pulled inside the duct's wall; on a
      // level diameter, labels go under and over their dots in turn, so two
      // pulled together do not meet.
      const lx = a.steep ? a.cx + 10 : Math.min(Math.max(a.cx, c - R + 26), c + R - 26);
      const vy = a.steep ? 5 : (a.p.point % 2 ? 20 : -12);
      svg.appendChild(dot(a.p, a.cx, a.cy, near >= 36, a.steep ? 10 : 0, vy, lx));
    }
    return svg;
  }
  const padL = 30, pad = 12, plotW = W - padL - pad;
  const plotH = Math.min(400, Math.max(150, plotW * (tr.height / tr.width), tr.points_h * 52));
  svg.setAttribute('viewBox', `0 0 ${W} ${plotH + 2 * pad + 12}`);
  svg.append(s('rect', { x: padL, y: pad, width: plotW, height: plotH, class: 'tduct' }),
    s('text', { x: padL, y: plotH + 2 * pad + 8, class: 'tlabel' }, 'ports on this side'));
  for (const p of states) {
    const cx = padL + p.depth * (plotW / tr.width), cy = pad + (p.port_offset || 0) * (plotH / tr.height);
    const m = /^line (\d+) point 1$/.exec(p.label);
    if (m) {
      svg.append(s('line', { x1: padL - 8, y1: cy, x2: padL, y2: cy, class: 'tport' }),
        s('text', { x: padL - 11, y: cy + 4, class: 'tlabel', 'text-anchor': 'end' }, m[1]));
    }
    // The velocity goes under its dot, above it on the bottom line, and
    // never across the duct's walls (a label is about 40 px wide).
    const lx = Math.min(Math.max(cx, padL + 24), padL + plotW - 24);
    const below = cy + 24 <= pad + plotH;
    svg.appendChild(dot(p, cx, cy, plotW / tr.points_w >= 40 && plotH / tr.points_h >= 36, 0, below ? 20 : -12, lx));
  }
  return svg;
}

// pointButtons: a 44 px button per point: on the drawing to scale, near-wall
// points sit too close together for a finger.
function pointButtons(states, current, onPick, line) {
  const lines = [...new Set(states.map((p) => p.line))];
  return h('div', { 'data-test': 'point-buttons' }, lines.map((n) => h('div', { class: 'tbtn-line' },
    h('span', { class: 'tbtn-head' }, `${line} ${n}`),
    states.filter((p) => p.line === n).map((p) => h('button', {
      type: 'button', class: `tbtn tp-${p.conflict ? 'conflict' : p.pending ? 'waiting' : p.read ? 'read' : 'unread'}${p.point === current ? ' tbtn-cur' : ''}`,
      'data-test': 'point-button', 'data-point': p.point, 'aria-pressed': String(p.point === current), on: { click: () => onPick(p.point) },
    }, h('span', { class: 'tbtn-n' }, String(p.point)), h('span', { class: 'tbtn-v' }, p.conflict ? '2×' : Number.isFinite(p.velocity) ? fmt(p.velocity, 0) : p.read ? '✓' : '·'))))));
}

// conflicts: points with two readings that each count; the lead voids one
// (with a reason) and the server computes again.
function conflicts(ctx, res) {
  const list = res.conflicts || [];
  return list.length > 0 && h('div', { class: 'scr-msg scr-msg-error', role: 'alert', 'data-test': 'traverse-conflicts' },
    h('strong', {}, 'Two readings of one point, each counting: no flow from that stage until all but one are voided.'),
    list.map((c) => h('div', { 'data-test': 'conflict', 'data-point': c.point }, h('p', {}, `${pointName(c)} (${kindWord(c.stage)}):`),
      h('ul', {}, c.readings.map((x) => {
        const r = ctx.role === 'lead' && byId(snap(ctx).readings, x.reading_id);
        return h('li', {}, `${num(x.value, undefined, x.unit)} by ${x.technician || 'unknown'} at ${timeText(x.taken_at)} `,
          r && (fixForm(ctx, r, { where: 'conflict' }) || h('div', {}, h('button', { type: 'button', class: 'btn danger', 'data-test': 'conflict-void', 'data-id': r.id, on: { click: () => openFix(ctx, r.id, 'void', 'conflict') } }, 'Void this one'))));
      })))),
    ctx.role !== 'lead' && h('p', {}, 'The lead resolves it.'));
}

export function render(ctx) {
  const id = ctx.params.id;
  const tr = byId(snap(ctx).traverses, id);
  const root = h('section', { class: 'scr', 'data-test': 'traverse-screen', 'data-tag': tr ? tr.tag : '' });
  if (!tr) return notFound(root, 'Traverse');
  const st = screenState(ctx, 'traverse', id, { point: 0, qty: 'vp' });
  const sys = byId(snap(ctx).systems, tr.system_id);
  const U = rUnits(ctx);
  const len = U.length || 'in';
  const method = String(tr.method).replace('tcheb', 'Tcheb').replace('l-a', 'l a');
  const duct = tr.shape === 'round'
    ? `Round duct ${asEntered(tr.diameter)} ${len} · ${method} · ${tr.diameters} diameters × ${tr.points_per_diameter} points`
    : `Rectangular duct ${asEntered(tr.width)} × ${asEntered(tr.height)} ${len} · ${method} · ${tr.points_h} lines × ${tr.points_w} points`;
  const where = sys && !String(tr.location).startsWith(sys.tag) ? [sys.tag, tr.location].filter(Boolean).join(' · ') : tr.location;
  put(root, header(`Traverse ${tr.tag}`, where),
    caution(onRoof(sys) || /roof/i.test(tr.location || '') ? 'roof' : 'ladder'), h('p', { class: 'scr-duct', 'data-test': 'traverse-duct' }, duct));

  const promptBox = h('div', { class: 'card' });
  const gridBox = h('div', { class: 'card scr-gridbox' });
  const resultBox = h('div');
  const planeBox = h('div', { class: 'card' });

  const refresh = () => {
    const res = byId(results(ctx).traverses, id);
    const states = pointStates(ctx, st, tr, res);
    if (states.length && !states.some((p) => p.point === st.point)) st.point = nextUnread(states, states.length);
    drawPrompt(states);
    const pick = (n) => { st.point = n; refresh(); };
    fill(gridBox, states.length
      ? [grid(tr, states, st.point, pick), pointButtons(states, st.point, pick, tr.shape === 'round' ? 'Diameter' : 'Line')]
      : h('p', { class: 'hint' }, 'The point positions come from the server; they show once it has answered.'),
    h('p', { class: 'scr-legend' }, `● read   ◍ waiting to send   ○ not read   ◎ this point${states.some((p) => p.conflict) ? '   2× two readings' : ''} · velocities in ${U.velocity || ''}`));
    const af = res && res.stage === 'final' && res.as_found;
    const pm = (r) => `${num(r.flow, 0, U.air_flow)}${Number.isFinite(r.flow_uncertainty) ? ` ± ${fmt(r.flow_uncertainty, 0)} ${U.air_flow}` : ''}`;
    fill(resultBox, resultCard('traverse-result', res && res.status, res, () => [
      h('div', { class: 'scr-status' }, badge(res.status), ` ${res.points_read} of ${res.points_total} points (${kindWord(res.stage)})`),
      conflicts(ctx, res),
      row(`${af ? 'Final flow' : 'Flow'} (${res.density_source === 'standard' ? 'standard air' : 'air at the plane'})`, pm(res), 'traverse-flow'),
      sys && sys.design && sys.design.airflow > 0 && row('Design', num(sys.design.airflow, 0, U.air_flow)),
      tolerance(res.tolerance, U.air_flow),
      af && h('div', { class: 'scr-agree', 'data-test': 'traverse-as-found' }, h('h3', {}, 'As found ', badge(af.status)),
        row('Flow', pm(af), 'traverse-as-found-flow'), tolerance(af.tolerance, U.air_flow),
        row('Points read', `${af.points_read} of ${af.points_total}`), messages(af)),
      res.uncertainty_note && h('details', { class: 'hint', 'data-test': 'traverse-uncertainty' },
        h('summary', {}, 'What the ± is made of'), `${res.uncertainty_note}.`),
      row('Mean velocity', num(res.mean_velocity, 0, U.velocity), 'traverse-velocity'),
      row('Area', num(res.area, U.system === 'si' ? 3 : 2, U.area)),
      row('Air density', `${num(res.density, 4, U.density)} · ${DENSITY[res.density_source] || res.density_source}`),
      messages(res)]));
  };

  const drawPrompt = (states) => {
    const p = states.find((x) => x.point === st.point);
    const qsel = h('select', { 'data-test': 'traverse-quantity' },
      h('option', { value: 'vp' }, 'velocity pressure (pitot tube)'), h('option', { value: 'velocity' }, 'velocity (anemometer)'));
    qsel.value = st.qty;
    qsel.addEventListener('change', () => { st.qty = qsel.value; refresh(); });
    const f = field(ctx, st, { test: 'reading-value', label: st.qty === 'vp' ? 'Velocity pressure' : 'Velocity', kind: 'traverse', qty: st.qty, point: st.point, inst: 'duct_pressure' });
    const note = noteLine('traverse-note');
    if (p) f.check = lineCheck(states, p, st.qty);
    const rm = noteInput('reading-note');
    const box = h('div', { 'aria-live': 'polite' });
    const save = saveButton('reading-save', p ? `Save point ${p.point}` : 'Save', async () => {
      const { items, bad } = collect([f]);
      if (!p || bad || !items.length) { note.textContent = bad ? 'That is not a number.' : 'Type the reading first.'; return; }
      const farOff = farReasons(items);
      if (farOff.length && !(await ask(box, farOff))) return;
      // A second value of a point supersedes the first, even in the outbox
      // (never two unmarked); as the other quantity, it voids the first.
      const hd = head(ctx, 'traverse', id, PT, p.point, st.stage);
      const it = items[0];
      it.note = rm.input.value.trim();
      it.confirmed = farOff.length > 0;
      if (hd && hd.quantity === it.f.qty) it.supersedes = hd.id;
      const list = hd && hd.quantity !== it.f.qty
        ? [{ f: { ...it.f, qty: hd.quantity, input: { value: '', dataset: {} } }, value: null, void: true, supersedes: hd.id, unit: hd.unit, note: `read again as ${it.f.qty === 'vp' ? 'velocity pressure' : 'velocity'}` }, it]
        : [it];
      await post(ctx, st, 'traverse', id, list);
      rm.input.value = '';
      st.point = nextUnread(pointStates(ctx, st, tr, byId(results(ctx).traverses, id)), p.point);
      // A redraw by the app meanwhile put up a new screen: draw that one.
      if (!root.isConnected) { ctx.rerender(); return; }
      refresh();
      const next = promptBox.querySelector('[data-test=reading-value]');
      if (next) next.focus({ preventScroll: true });
    });
    f.input.addEventListener('keydown', (e) => { if (e.key === 'Enter') { e.preventDefault(); save.click(); } });
    const step = (d) => { if (states.length) { st.point = ((st.point - 1 + d + states.length) % states.length) + 1; refresh(); } };
    const stepBtn = (test, text, d) => h('button', { type: 'button', class: 'btn secondary', 'data-test': test, on: { click: () => step(d) } }, text);
    fill(promptBox,
      h('p', { class: 'scr-prompt', 'data-test': 'traverse-point', 'data-point': String(p ? p.point : 0) }, p ? pointWords(p, len) : 'No point positions yet.'),
      p && p.stored && h('p', { class: 'hint', 'data-test': 'point-read' }, `Read ${asEntered(p.stored.value)} ${unitLabel(ctx, p.stored.unit)}${p.pending ? ' (not sent yet)' : ''}; a new value here corrects it.`),
      h('p', { class: 'hint', 'data-test': 'traverse-progress' }, `${states.filter((x) => x.read).length} of ${states.length} points read (${kindWord(st.stage)}).`),
      h('label', { class: 'scr-pick' }, h('span', { class: 'scr-pick-label' }, 'Reading'), qsel),
      f.el, rm.el, box,
      h('div', { class: 'scr-actions' }, save),
      h('div', { class: 'scr-actions' }, stepBtn('point-prev', '‹ Previous', -1), stepBtn('point-next', 'Next ›', 1)),
      note);
  };

  // Air state and static at the plane: the server takes the density from them.
  const drawPlane = () => {
    const f = (qty, label, inst, signed) => field(ctx, st, { test: `q-${qty}`, label, kind: 'traverse', qty, inst, signed, hint: nowHint(ctx, id, qty, 0, st.stage) });
    const fs = [f('air_db', 'Air dry bulb', 'air_state'), f('air_wb', 'Wet bulb', 'air_state'), f('air_rh', 'or RH', 'air_state'), f('static', 'Static pressure', 'duct_pressure', true)];
    const note = noteLine('plane-note', st);
    fill(planeBox, h('h2', {}, 'At the plane'),
      h('p', { class: 'hint' }, 'Dry bulb with wet bulb or RH gives the air density; without them the server uses standard air.'),
      h('div', { class: 'scr-picks' }, instrumentSelect(ctx, st, 'air_state', ['psychrometer', 'hygrometer', 'thermometer'], { label: 'Air instrument', test: 'instrument-air' })),
      h('div', { class: 'form-grid' }, fs.map((x) => x.el)),
      saveRow(ctx, st, { test: 'plane-save', text: 'Save plane readings', kind: 'traverse', id, fs, note, done: drawPlane }),
      note);
  };

  const picks = h('div', { class: 'scr-picks' }, stageSelect(st, () => { refresh(); drawPlane(); }),
    instrumentSelect(ctx, st, 'duct_pressure', ['manometer', 'anemometer']));
  drawPlane();
  refresh();
  put(root, h('div', { class: 'cols' }, h('div', {}, picks, promptBox, gridBox, historyView(ctx, 'traverse', id, { signed: true })), h('div', {}, resultBox, planeBox)));
  return root;
}
