// Fan screen: a system's fan and motor in the steps a technician takes them
// (nameplate and drive, speed, volts and amps, static pressures), each saved
// on its own with the server's results beside it.
import { h, caution, onRoof, kindWord, statusBadge, agreeText, sideLine } from '../ui.js';
import {
  screenState, snap, results, rUnits, byId, field, stageSelect, instrumentSelect, badge, row, num,
  tolerance, messages, header, noteLine, nowHint, put, fill, unitLabel, unitFor, saveRow, notFound,
} from './entry.js';
import { band, far, historyView, lineName } from './fix.js';

const STATICS = [
  ['static_supply', 'Fan discharge static'], ['static_return', 'Fan inlet (suction) static'], ['static_external', 'External static'],
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
  const res = byId(results(ctx).systems, id) || null;
  const kw = (v) => (v === undefined ? 'needs a power factor reading' : num(v, 2, U.electric_power));

  // Bands to ask before sending a slip (common practice, not tolerances).
  const CHECK = {
    fan_rpm: (v) => band(v, d.fan_rpm, 2 / 3, 1.5, `the design ${num(d.fan_rpm, 0)} rpm`),
    motor_rpm: (v) => band(v, d.motor_rpm, 2 / 3, 1.5, `the nameplate ${num(d.motor_rpm, 0)} rpm`),
    volts: (v) => band(v, d.volts, 0.8, 1.2, `the nameplate ${num(d.volts, 0)} V`),
    amps: (v) => band(v, d.fla, 0, 1.5, `the nameplate ${num(d.fla, 1)} A FLA`),
    static_external: (v) => far(v, d.external_static, `the design ${num(d.external_static, dg, U.duct_pressure)}`),
  };
  const NEG = (q) => q.startsWith('static');

  // step: fields, their own Save, results beside.
  const step = (n, title, test, top, build, out) => {
    const box = h('div', { class: 'step-form' });
    const draw = () => {
      const fs = [];
      const add = (t, label, qty, point = 0, inst) => {
        const f = field(ctx, st, { test: t, label, kind: 'system', qty, point, inst, check: CHECK[qty], signed: NEG(qty), hint: nowHint(ctx, id, qty, point, st.stage) });
        fs.push(f);
        return f.el;
      };
      const note = noteLine(`${test}-note`, st.step === test ? st : null);
      fill(box, build(add), saveRow(ctx, st, {
        test, text: `Save ${title.toLowerCase()}`, kind: 'system', id, fs, note,
        done: () => { st.step = test; draw(); },
      }), note);
    };
    draw();
    return h('section', { class: 'card step', 'data-test': `step-${test}` }, h('h2', {}, `${n} · ${title}`), top,
      h('div', { class: 'step-cols' }, box, h('div', { class: 'step-out', 'data-test': `${test}-result` }, res ? out() : h('p', { class: 'hint' }, 'No result from the server yet.'))));
  };
  const grid = (...xs) => h('div', { class: 'form-grid' }, xs);
  const legs = (add, qty, word) => (phases === 1
    ? grid(add(`q-${qty}`, word, qty, 0, 'electrical'))
    : h('div', { class: 'scr-legs' }, h('div', { class: 'scr-legs-head' }, `${word} (${unitLabel(ctx, unitFor(ctx, 'system', qty))})`),
      [1, 2, 3].map((leg) => add(`q-${qty}-${leg}`, lineName(qty, leg), qty, leg, 'electrical'))));
  const legText = (qty, list, unit, digits) => (list && list.length ? `${list.map((l) => `${l.leg ? `${lineName(qty, l.leg)} ` : ''}${num(l.value, digits)}`).join(' · ')} ${unit}` : '—');
  const pct = (v) => (v === undefined ? '—' : `${num(v, 1)} %`);
  const fl = res && res.fan_law;
  const plate = [['Make', d.make], ['Model', d.model], ['Serial', d.serial], ['Motor', [d.motor_make, d.motor_frame && `frame ${d.motor_frame}`].filter(Boolean).join(', ')],
    ['Motor rating', `${num(d.motor_hp, 1, U.system === 'si' ? 'kW' : 'hp')} · ${num(d.volts, 0, 'V')} ${phases === 1 ? 'single' : 'three'} phase · ${num(d.fla, 1, 'A')} FLA${d.service_factor ? ` · SF ${d.service_factor}` : ''}`],
    ['Speeds', `fan ${num(d.fan_rpm, 0, 'rpm')} · motor ${num(d.motor_rpm, 0, 'rpm')}`],
    ['Fan sheave', [d.fan_sheave_size, d.fan_sheave_pitch && num(d.fan_sheave_pitch, dg, U.length)].filter(Boolean).join(', ')],
    ['Motor sheave', [d.motor_sheave_size, d.motor_sheave_pitch && num(d.motor_sheave_pitch, dg, U.length)].filter(Boolean).join(', ')],
    ['Belts', d.belts], ['Bushings', [d.fan_bushing, d.motor_bushing].filter(Boolean).join(' / ')], ['Filters', d.filters]].filter(([, v]) => v);

  put(root, header(`Fan and motor ${sys.tag}`, [kindWord(sys.kind), sys.name].filter(Boolean).join(' · ')),
    onRoof(sys) && caution('roof'), caution('rotating'),
    h('div', { class: 'card' }, h('div', { class: 'scr-picks' }, stageSelect(st, () => ctx.rerender())),
      row('Airflow', res && res.airflow !== undefined ? num(res.airflow, 0, U.air_flow) + ({ traverse: ` (from the traverse${(byId(results(ctx).traverses, res.airflow_traverse_id) || {}).density_source === 'standard' ? ', standard air' : ''})`, outlets: res.airflow_outlets_read < res.airflow_outlets_total
        ? ` (sum of ${res.airflow_outlets_read} of ${res.airflow_outlets_total} outlets read: not judged until all are)` : ' (sum of the outlets)' }[res.airflow_source] || '') : 'not measured yet', 'fan-airflow'),
      row('Design airflow', num(d.airflow, 0, U.air_flow)),
      res && tolerance(res.airflow_tolerance, U.air_flow),
      res && res.outlets_vs_traverse && h('div', { class: 'scr-tol', 'data-test': 'fan-agreement' }, agreeText(res.outlets_vs_traverse, U.air_flow), statusBadge(res.outlets_vs_traverse.status), sideLine(res.outlets_vs_traverse.tolerance)),
      res && res.errors && res.errors.length > 0 && h('div', { class: 'scr-status' }, badge('error')),
      res && messages({ errors: res.errors, flags: res.flags })),
    step(1, 'Nameplate and drive', 'drive', h('dl', { class: 'plate', 'data-test': 'fan-design' }, plate.map(([k, v]) => [h('dt', {}, k), h('dd', {}, v)])),
      (add) => [h('p', { class: 'hint' }, 'Check the nameplate against the data above; say what differs in the remark. Lock out before measuring the sheaves.'),
        grid(add('q-motor_sheave', 'Motor sheave pitch diameter', 'motor_sheave'), add('q-fan_sheave', 'Fan sheave pitch diameter', 'fan_sheave'))],
      () => [row('Sheaves (motor / fan)', `${num(res.motor_sheave, dg)} / ${num(res.fan_sheave, dg)} ${U.length || ''}`),
        fl && row('Motor sheave for design', num(fl.motor_sheave, dg, U.length), 'fan-law-sheave')]),
    step(2, 'Speed', 'speed', null,
      (add) => [instrumentSelect(ctx, st, 'speed', ['tachometer'], { label: 'Tachometer' }), grid(add('q-fan_rpm', 'Fan', 'fan_rpm', 0, 'speed'), add('q-motor_rpm', 'Motor', 'motor_rpm', 0, 'speed'))],
      () => [row('Fan / motor speed', `${num(res.fan_rpm, 0)} / ${num(res.motor_rpm, 0)} rpm`), row('Design fan speed', num(d.fan_rpm, 0, 'rpm')), res.fan_rpm_percent_of_design !== undefined && row('Fan speed, % of design', pct(res.fan_rpm_percent_of_design), 'fan-rpm-pct'),
        fl && h('div', { class: 'scr-agree', 'data-test': 'fan-law' }, h('h3', {}, `To reach design (${num(fl.target_flow, 0, U.air_flow)})`),
          row('Fan speed', num(fl.fan_rpm, 0, 'rpm'), 'fan-law-rpm'), row('Input power', kw(fl.input_power_kw), 'fan-law-power'), fl.note && h('p', { class: 'hint' }, fl.note)),
        // Why there is no "to reach design" (a partial sum, or beyond the laws' reach).
        !fl && (res.notes || []).filter((n) => /fan-law/.test(n)).map((n) => h('p', { class: 'msg msg-warn', 'data-test': 'fan-law-none' }, n))]),
    step(3, 'Volts and amps', 'electrical', caution('electrical'),
      (add) => [instrumentSelect(ctx, st, 'electrical', ['clamp_meter', 'multimeter'], { label: 'Meter', test: 'instrument-electrical' }),
        h('p', { class: 'hint' }, phases === 1 ? 'Single phase: one reading each.' : 'Volts line to line, amps on each line.'),
        legs(add, 'volts', 'Volts'), legs(add, 'amps', 'Amps'), grid(add('q-power_factor', 'Power factor (if read)', 'power_factor', 0, 'electrical'))],
      () => [res.motor_status && h('div', { class: 'scr-status', 'data-test': 'motor-status', 'data-status': res.motor_status }, statusBadge(res.motor_status, res.motor_status === 'ok' ? 'motor checks pass' : 'motor check: see the warnings')),
        messages({ warnings: res.motor_warnings }), row('Volts', legText('volts', res.volts, 'V', 0)), row('Amps', legText('amps', res.amps, 'A', 1)),
        row('% of nameplate FLA (highest line)', res.percent_fla === undefined ? '—' : `${num(res.percent_fla, 0)} % of ${num(d.fla, 1)} A`, 'fan-fla'),
        row('Voltage imbalance', pct(res.voltage_imbalance_pct), 'fan-vimb'), row('Current imbalance', pct(res.current_imbalance_pct), 'fan-aimb'),
        row('Input power', kw(res.input_power_kw), 'fan-kw'), messages({ notes: res.notes })]),
    step(4, 'Static pressures', 'statics', null,
      (add) => [instrumentSelect(ctx, st, 'duct_pressure', ['manometer'], { label: 'Manometer', test: 'instrument-static' }),
        grid(STATICS.map(([q, label]) => add(`q-${q}`, label, q, 0, 'duct_pressure')))],
      () => [STATICS.filter(([q]) => res.statics && res.statics[q] !== undefined).map(([q, l]) => row(l, num(res.statics[q], dg, U.duct_pressure))),
        d.external_static > 0 && row('Design external static', num(d.external_static, dg, U.duct_pressure)),
        res.external_static_percent_of_design !== undefined && row('External static, % of design', pct(res.external_static_percent_of_design), 'fan-static-pct'),
        fl && row('External static at design flow', num(fl.static_pressure, dg, U.duct_pressure), 'fan-law-static')]),
    historyView(ctx, 'system', id, { signed: true }));
  return root;
}
