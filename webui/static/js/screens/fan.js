// Fan screen: a system's fan and motor readings (speeds, volts and amps per
// leg, static pressures, sheaves). % of FLA, imbalance, power and the fan-law
// prediction come from the server.
import { h, caution, kindWord } from '../ui.js';
import {
  screenState, snap, results, rUnits, byId, field, stageSelect, instrumentSelect, pendingView, badge, row, num,
  tolerance, messages, header, noteLine, nowHint, put, fill, unitLabel, unitFor, saveRow, resultCard, notFound,
} from './entry.js';

// The instrument group of each reading (sheaves are read with a gauge: no instrument record).
const INST = { fan_rpm: 'speed', motor_rpm: 'speed', volts: 'electrical', amps: 'electrical', power_factor: 'electrical' };
const STATICS = [
  ['static_supply', 'Supply static'], ['static_return', 'Return static'], ['static_external', 'External static'],
  ['static_filter', 'Across the filters'], ['static_coil', 'Across the coil'],
];

export function render(ctx) {
  const id = ctx.params.id;
  const sys = byId(snap(ctx).systems, id);
  const root = h('section', { class: 'scr', 'data-test': 'fan-screen', 'data-tag': sys ? sys.tag : '' });
  if (!sys) return notFound(root, 'System');
  const st = screenState(ctx, 'system', id);
  const U = rUnits(ctx);
  const d = sys.design || {};
  const dg = U.system === 'si' ? 0 : 2; // Pa and mm are whole; in. w.g. and inches take two decimals
  const phases = d.phase === 1 ? 1 : 3;

  put(root, header(`Fan and motor ${sys.tag}`, [kindWord(sys.kind), sys.name].filter(Boolean).join(' · ')),
    // Each caution sits by the work it is about: roof here, live electrical by
    // the volts and amps, lockout by the sheaves.
    sys.kind === 'rooftop_unit' && caution('roof'),
    h('p', { class: 'scr-duct', 'data-test': 'fan-design' },
      `Design ${num(d.airflow, 0, U.air_flow)} at ${num(d.external_static, dg, U.duct_pressure)} external · fan ${num(d.fan_rpm, 0, 'rpm')} · motor ${num(d.motor_hp, 1, 'hp')}, ${num(d.motor_rpm, 0, 'rpm')}, ${num(d.fla, 1, 'A')} FLA, ${num(d.volts, 0, 'V')} ${phases === 1 ? 'single' : 'three'} phase`));

  const formBox = h('div', { class: 'card' });
  const pendingBox = h('div', {}, pendingView(ctx, st));
  const drawForm = () => {
    const fs = [];
    const add = (test, label, qty, point = 0) => {
      const inst = INST[qty] || (qty.startsWith('static') ? 'duct_pressure' : 'none');
      const f = field(ctx, st, { test, label, kind: 'system', qty, point, hint: nowHint(ctx, id, qty, point, st.stage), inst });
      fs.push(f);
      return f.el;
    };
    // Three legs side by side, one line per quantity, as on a paper form.
    const legs = (qty, word) => (phases === 1
      ? h('div', { class: 'form-grid' }, add(`q-${qty}`, word, qty, 0))
      : h('div', { class: 'scr-legs' }, h('div', { class: 'scr-legs-head' }, `${word} (${unitLabel(ctx, unitFor(ctx, 'system', qty))})`),
        [1, 2, 3].map((leg) => add(`q-${qty}-${leg}`, `Leg ${leg}`, qty, leg))));
    const group = (title, pick, ...body) => h('fieldset', { class: 'scr-group' }, h('legend', {}, title), pick && h('div', { class: 'scr-picks' }, pick), body);
    const note = noteLine('fan-note', st);
    fill(formBox,
      h('div', { class: 'scr-picks' }, stageSelect(st, drawForm)),
      group('Speeds', instrumentSelect(ctx, st, 'speed', ['tachometer'], { label: 'Tachometer' }),
        h('div', { class: 'form-grid' }, add('q-fan_rpm', 'Fan', 'fan_rpm'), add('q-motor_rpm', 'Motor', 'motor_rpm'))),
      caution('electrical'),
      group('Motor volts and amps', instrumentSelect(ctx, st, 'electrical', ['clamp_meter', 'multimeter'], { label: 'Meter', test: 'instrument-electrical' }),
        h('p', { class: 'hint' }, phases === 1 ? 'Single phase: one reading each.' : 'Volts leg to leg, amps on each leg (1 to 3).'),
        legs('volts', 'Volts'), legs('amps', 'Amps'),
        h('div', { class: 'form-grid' }, add('q-power_factor', 'Power factor (if read)', 'power_factor'))),
      group('Static pressures', instrumentSelect(ctx, st, 'duct_pressure', ['manometer'], { label: 'Manometer', test: 'instrument-static' }),
        h('div', { class: 'form-grid' }, STATICS.map(([q, label]) => add(`q-${q}`, label, q)))),
      caution('rotating'),
      group('Sheave pitch diameters', null,
        h('div', { class: 'form-grid' }, add('q-motor_sheave', 'Motor sheave', 'motor_sheave'), add('q-fan_sheave', 'Fan sheave', 'fan_sheave'))),
      saveRow(ctx, st, { test: 'fan-save', kind: 'system', id, fs, note, done: () => { drawForm(); fill(pendingBox, pendingView(ctx, st)); } }),
      note);
  };
  drawForm();

  const res = byId(results(ctx).systems, id);
  const bad = res && res.errors && res.errors.length > 0;
  const result = resultCard('fan-result', bad ? 'error' : 'computed', res, () => {
    const legs = (list, unit, digits) => (list && list.length ? `${list.map((l) => `${l.leg ? `L${l.leg} ` : ''}${num(l.value, digits)}`).join(' · ')} ${unit}` : '—');
    const pct = (v) => (v === undefined ? '—' : `${num(v, 1)} %`);
    const fl = res.fan_law;
    const kw = (v) => (v === undefined ? 'needs a power factor reading' : num(v, 2, U.electric_power));
    const src = { traverse: ' (from the traverse)', outlets: ' (sum of the outlets)' }[res.airflow_source] || '';
    return [
      bad && h('div', { class: 'scr-status' }, badge('error')),
      row('Airflow', res.airflow !== undefined ? num(res.airflow, 0, U.air_flow) + src : 'not measured yet', 'fan-airflow'),
      row('Design airflow', num(res.design_airflow, 0, U.air_flow)),
      tolerance(res.airflow_tolerance, U.air_flow),
      row('Fan / motor speed', `${num(res.fan_rpm, 0)} / ${num(res.motor_rpm, 0)} rpm`),
      row('Volts', legs(res.volts, 'V', 0)),
      row('Amps', legs(res.amps, 'A', 1)),
      row('% of FLA (highest leg)', res.percent_fla === undefined ? '—' : `${num(res.percent_fla, 0)} % of ${num(d.fla, 1)} A`, 'fan-fla'),
      row('Voltage imbalance', pct(res.voltage_imbalance_pct), 'fan-vimb'),
      row('Current imbalance', pct(res.current_imbalance_pct), 'fan-aimb'),
      row('Input power', kw(res.input_power_kw), 'fan-kw'),
      STATICS.filter(([q]) => res.statics && res.statics[q] !== undefined).map(([q, l]) => row(l, num(res.statics[q], dg, U.duct_pressure))),
      row('Sheaves (motor / fan)', `${num(res.motor_sheave, dg)} / ${num(res.fan_sheave, dg)} ${U.length || ''}`),
      fl && h('div', { class: 'scr-agree', 'data-test': 'fan-law' },
        h('h3', {}, `To reach design (${num(fl.target_flow, 0, U.air_flow)})`),
        row('Fan speed', num(fl.fan_rpm, 0, 'rpm'), 'fan-law-rpm'),
        row('External static', num(fl.static_pressure, dg, U.duct_pressure), 'fan-law-static'),
        row('Input power', kw(fl.input_power_kw), 'fan-law-power'),
        row('New motor sheave', num(fl.motor_sheave, dg, U.length), 'fan-law-sheave'),
        fl.note && h('p', { class: 'hint' }, fl.note)),
      messages(res)];
  });

  put(root, h('div', { class: 'cols' }, h('div', {}, formBox, pendingBox), h('div', {}, result)));
  return root;
}
