// Water test: valve ΔP (Cv) or meter flow and the water temperatures; every
// figure is the server's.
import { h, caution, statusBadge } from '../ui.js';
import {
  screenState, snap, results, rUnits, byId, field, stageSelect, instrumentSelect, badge, row, num,
  tolerance, messages, header, noteLine, nowHint, missingList, jobUnits, put, fill, saveRow, resultCard, notFound, power, asEntered,
} from './entry.js';
import { far, historyView } from './fix.js';

const FLUIDS = { water: 'water', pg: 'propylene glycol', eg: 'ethylene glycol' };
const WORDS = { dp: 'the valve ΔP', flow: 'the meter flow', enter_temp: 'entering water temperature', leave_temp: 'leaving water temperature' };

export function render(ctx) {
  const id = ctx.params.id;
  const wt = byId(snap(ctx).water_tests, id);
  const root = h('section', { class: 'scr', 'data-test': 'water-screen', 'data-tag': wt ? wt.tag : '' });
  if (!wt) return notFound(root, 'Water test');
  const st = screenState(ctx, 'water_test', id);
  const sys = byId(snap(ctx).systems, wt.system_id);
  const U = rUnits(ctx);
  const si = jobUnits(ctx) === 'si';
  const res = byId(results(ctx).water_tests, id);
  const linked = wt.capacity_test_id ? byId(snap(ctx).capacity_tests, wt.capacity_test_id) : null;
  const valve = wt.flow_source === 'valve';
  const fluid = wt.fluid && wt.fluid !== 'water' ? `${FLUIDS[wt.fluid] || wt.fluid}, ${wt.concentration} % by volume` : 'water';
  // Hot: a heating coil (stated, or as the water shows), or water above
  // about 120 °F (49 °C): common practice for a scald risk.
  const lim = si ? 49 : 120;
  const hot = wt.mode === 'heating' || (res && (res.process === 'heating' || res.enter_temp > lim || res.leave_temp > lim));

  put(root, header(`Water test ${wt.tag}`, sys ? [sys.tag, sys.name].filter(Boolean).join(' · ') : ''),
    caution(hot ? 'hot_water' : 'piping'), sys && (sys.kind === 'pump' || sys.kind === 'water_loop') && caution('pump'),
    h('div', { class: 'scr-duct', 'data-test': 'water-source' },
      h('div', {}, valve ? `Balancing valve, ${si ? 'Kv' : 'Cv'} ${asEntered(wt.valve_cv)}: read the ΔP across it` : 'Flow meter: read the flow'),
      h('div', {}, `Fluid: ${fluid} · design ${num(wt.design_flow, 1, U.water_flow)}`),
      linked && h('div', {}, `Air side: capacity test ${linked.tag}`),
      h('div', { 'data-test': 'water-mode' }, `Stated mode: ${wt.mode || 'not stated'}${res && res.process ? ` · the water shows ${res.process}` : ''}`)),
    res && res.mode_note && h('div', { class: 'scr-msg scr-msg-warn', role: 'alert', 'data-test': 'water-mode-note' }, h('strong', {}, 'Check the mode: '), `${res.mode_note}.`));

  const formBox = h('div', { class: 'card' });
  const drawForm = () => {
    const f = (test, label, qty, inst) => field(ctx, st, { test, label, kind: 'water_test', qty, hint: nowHint(ctx, id, qty, 0, st.stage), inst,
      check: qty === 'flow' ? (v) => far(v, wt.design_flow, `the design ${num(wt.design_flow, 1, U.water_flow)}`) : null });
    const fs = [valve ? f('q-dp', 'Valve ΔP', 'dp', 'hydronic') : f('q-flow', 'Meter flow', 'flow', 'hydronic'),
      f('q-enter_temp', 'Entering water', 'enter_temp', 'water_temp'), f('q-leave_temp', 'Leaving water', 'leave_temp', 'water_temp')];
    const note = noteLine('water-note', st);
    fill(formBox,
      h('div', { class: 'scr-picks' }, stageSelect(st, drawForm),
        instrumentSelect(ctx, st, 'hydronic', ['hydronic_meter', 'flow_meter'], { label: valve ? 'ΔP instrument' : 'Flow instrument' })),
      h('div', { class: 'form-grid' }, fs[0].el),
      h('div', { class: 'scr-picks' }, instrumentSelect(ctx, st, 'water_temp', ['thermometer', 'hydronic_meter'], { label: 'Thermometer', test: 'instrument-temp' })),
      h('div', { class: 'form-grid' }, fs[1].el, fs[2].el),
      saveRow(ctx, st, { test: 'water-save', kind: 'water_test', id, fs, note, done: drawForm }),
      note);
  };
  drawForm();

  const result = resultCard('water-result', res && res.status, res, () => {
    const c = res.capacity, a = res.air_side, t = U.temperature;
    const cool = (c ? c.process : wt.mode) === 'cooling';
    return [
      h('div', { class: 'scr-status' }, badge(res.status)),
      res.dp !== undefined && row('Valve ΔP', num(res.dp, 2, U.water_pressure)),
      res.valve_accuracy_pct !== undefined && row('Valve flow accuracy', `± ${num(res.valve_accuracy_pct, 0)} % (${res.valve_accuracy_source === 'default' ? 'default, common practice' : 'stated'})`, 'water-valve-accuracy'),
      row('Flow', num(res.flow, 1, U.water_flow), 'water-flow'),
      row('Design', num(res.design_flow, 1, U.water_flow)),
      tolerance(res.tolerance, U.water_flow, 1),
      row('Entering / leaving', `${num(res.enter_temp, 1, t)} / ${num(res.leave_temp, 1, t)}`),
      c && [row(`Capacity (${c.process})`, power(c.capacity, U.power, c.process === 'cooling'), 'water-capacity'), row('Mean water temperature', num(c.mean_temp, 1, t))],
      res.specific_gravity !== undefined && row('Specific gravity used', num(res.specific_gravity, 3)),
      a && h('div', { class: 'scr-agree', 'data-test': 'water-agreement' },
        h('h3', {}, 'Air side and water side ', a.note ? statusBadge('flag', 'sides differ') : statusBadge('within', 'sides agree')),
        row('Air side (capacity test)', power(a.air_total, U.power, cool)),
        row('Water side', power(a.water_capacity, U.power, cool)),
        row('Difference', `${num(a.difference_pct, 1)} %`, 'water-difference'),
        h('p', { class: 'hint' }, a.note || 'The server finds the two sides in agreement.')),
      missingList(res.missing, WORDS), messages(res)];
  });

  put(root, h('div', { class: 'cols' }, h('div', {}, formBox, historyView(ctx, 'water_test', id)), h('div', {}, result)));
  return root;
}
