// Capacity test: entering and leaving air, outdoor dry bulb, a direct airflow;
// every figure and the chart's curves are the server's.
import { h, caution, onRoof, sideLine } from '../ui.js';
import { psychroChart, chartRange, loadChart, cachedChart } from '../chart.js';
import {
  screenState, snap, results, rUnits, byId, field, stageSelect, instrumentSelect, badge, row, num,
  messages, header, noteLine, nowHint, missingList, put, fill, saveRow, resultCard, notFound, power,
} from './entry.js';
import { far, historyView } from './fix.js';

const WORDS = {
  enter_db: 'entering dry bulb', enter_wb: 'entering wet bulb', enter_rh: 'entering RH', enter_dp: 'entering dew point',
  leave_db: 'leaving dry bulb', leave_wb: 'leaving wet bulb', leave_rh: 'leaving RH', leave_dp: 'leaving dew point',
  outdoor_db: 'outdoor dry bulb', flow: 'the airflow reading',
};
const BASIS = { standard: 'standard air', enter: 'entering air', leave: 'leaving air' };
const EXPECTED = { perf_table: 'performance table', nameplate: 'nameplate rating' };
const AIR_KINDS = ['psychrometer', 'hygrometer', 'thermometer'];

export function render(ctx) {
  const id = ctx.params.id;
  const ct = byId(snap(ctx).capacity_tests, id);
  const root = h('section', { class: 'scr', 'data-test': 'capacity-screen', 'data-tag': ct ? ct.tag : '' });
  if (!ct) return notFound(root, 'Capacity test');
  const st = screenState(ctx, 'capacity_test', id);
  const sys = byId(snap(ctx).systems, ct.system_id);
  const trv = ct.traverse_id ? byId(snap(ctx).traverses, ct.traverse_id) : null;
  const U = rUnits(ctx);
  const res = byId(results(ctx).capacity_tests, id);
  const flow = res && res.airflow !== undefined ? ` · ${num(res.airflow, 0, U.air_flow)}` : '';
  const source = { traverse: `Airflow from traverse ${trv ? trv.tag : '(not found)'}`, outlets: `Airflow from the sum of ${sys ? sys.tag : 'the system'}'s supply outlets` }[ct.flow_source] || 'Airflow read directly';

  put(root, header(`Capacity test ${ct.tag}`, [sys && sys.tag, ct.mode && `${ct.mode} test`].filter(Boolean).join(' · ')),
    onRoof(sys) && caution('roof'),
    h('p', { class: 'scr-duct', 'data-test': 'capacity-source' }, source + flow,
      trv && ' ', trv && h('button', { type: 'button', class: 'btn scr-linkbtn', 'data-test': 'open-traverse', on: { click: () => ctx.go(`#/job/${ctx.jobId}/traverse/${trv.id}`) } }, 'Open the traverse')));

  const formBox = h('div', { class: 'card' });
  const drawForm = () => {
    const fs = [];
    const add = (test, label, qty) => {
      const f = field(ctx, st, { test, label, kind: 'capacity_test', qty, hint: nowHint(ctx, id, qty, 0, st.stage), inst: qty === 'flow' ? 'flow' : 'air_state', check: qty === 'flow' && sys ? (v) => far(v, sys.design.airflow, `the design ${num(sys.design.airflow, 0, U.air_flow)}`) : null });
      fs.push(f);
      return f.el;
    };
    const group = (title, side) => h('fieldset', { class: 'scr-group' }, h('legend', {}, title),
      h('div', { class: 'form-grid' }, add(`q-${side}_db`, 'Dry bulb', `${side}_db`), add(`q-${side}_wb`, 'Wet bulb', `${side}_wb`), add(`q-${side}_rh`, 'or RH', `${side}_rh`)));
    const note = noteLine('capacity-note', st);
    fill(formBox,
      h('div', { class: 'scr-picks' }, stageSelect(st, drawForm), instrumentSelect(ctx, st, 'air_state', AIR_KINDS)),
      h('p', { class: 'hint' }, 'For each air state give the dry bulb and either the wet bulb or the RH.'),
      group('Entering air', 'enter'), group('Leaving air', 'leave'),
      h('div', { class: 'form-grid' }, add('q-outdoor_db', 'Outdoor dry bulb', 'outdoor_db')),
      ct.flow_source === 'direct' && h('fieldset', { class: 'scr-group' }, h('legend', {}, 'Airflow, read directly'),
        h('div', { class: 'scr-picks' }, instrumentSelect(ctx, st, 'flow', ['flow_hood', 'anemometer', 'manometer', 'flow_meter'], { label: 'Flow instrument', test: 'instrument-flow' })),
        h('div', { class: 'form-grid' }, add('q-flow', 'Airflow', 'flow'))),
      saveRow(ctx, st, { test: 'capacity-save', kind: 'capacity_test', id, fs, note, done: drawForm }),
      note);
  };
  drawForm();

  const result = resultCard('capacity-result', res && res.status, res, () => {
    const c = res.capacity, u = res.uncertainty || {}, e = res.expected, ex = e && !e.at_test_conditions ? 'Rated' : 'Expected';
    const cool = (c ? c.process : ct.mode) === 'cooling';
    const pm = (v, unc) => `${power(v, U.power, cool)}${unc ? ` ± ${num(unc, 0)} ${U.power}` : ''}`;
    const basis = res.flow_basis ? ` (${BASIS[res.flow_basis] || res.flow_basis})` : '';
    return [
      h('div', { class: 'scr-status' }, badge(res.status)), sideLine(res, 'Delivered:'),
      res.airflow !== undefined && row('Airflow', num(res.airflow, 0, U.air_flow) + basis, 'capacity-airflow'),
      c && [row(`Total (${c.process})`, pm(c.total, u.total), 'capacity-total'), row('Sensible', pm(c.sensible, u.sensible), 'capacity-sensible'),
        row('Latent', power(c.latent, U.power, cool), 'capacity-latent'), row('Sensible heat ratio', num(c.shr, 2), 'capacity-shr')],
      e && row(`${ex} total (${EXPECTED[e.source] || e.source})`, power(e.total, U.power, ct.mode === 'cooling'), 'capacity-expected'),
      e && e.basis && h('p', { class: 'hint', 'data-test': 'capacity-basis' }, `Basis: ${e.basis}.`),
      e && e.sensible !== undefined && row(`${ex} sensible`, power(e.sensible, U.power, ct.mode === 'cooling')),
      res.percent_of_expected !== undefined && row('Delivered', `${num(res.percent_of_expected, 1)} % of ${ex.toLowerCase()}`, 'capacity-percent'),
      e && e.note && h('p', { class: 'hint' }, e.note),
      u.omits && u.omits.length > 0 && h('p', { class: 'hint' }, `The ± leaves out: ${u.omits.join('; ')}.`),
      // The form reads wet bulb or RH; a dew point is for the API alone.
      states(res, U), missingList((res.missing || []).map((t) => t.replace(/, (enter|leave)_rh or \1_dp/, ' or $1_rh')), WORDS), messages(res)];
  });

  const chartBox = h('div', { class: 'card scr-chartbox', 'data-test': 'chart-box' }, h('h2', {}, 'Psychrometric chart'));
  drawChart(ctx, chartBox, res, U);
  put(root, h('div', { class: 'cols' }, h('div', {}, formBox, historyView(ctx, 'capacity_test', id)), h('div', {}, result)), chartBox);
  return root;
}

// drawChart: from curves kept in memory, else when the server answers.
function drawChart(ctx, box, res, U) {
  const enter = res && res.enter, leave = res && res.leave;
  const units = ctx.units || 'ip';
  const { low, high } = chartRange(enter, leave, units);
  const title = box.firstChild;
  const show = (data) => fill(box, title, data
    ? [psychroChart(data, enter, leave, units),
      h('p', { class: 'hint' }, `At the site pressure, ${num(data.pressure, 2, U.barometric)}. The line runs from the entering state (orange) to the leaving state (blue): the coil's process.`)]
    : h('p', { class: 'hint', 'data-test': 'chart-offline' }, 'The chart needs the server once; the air states are listed with the result.'));
  const have = cachedChart(ctx.jobId, low, high);
  if (have) return show(have);
  put(box, h('p', { class: 'hint' }, 'Loading the chart…'));
  loadChart(ctx.jobId, low, high).then(show);
}

// states: the two air states as the server computed them.
function states(res, U) {
  if (!res.enter && !res.leave) return null;
  const t = U.temperature || '';
  const line = (label, k, d, unit) => h('tr', {}, h('th', { scope: 'row' }, label),
    [res.enter, res.leave].map((s) => h('td', {}, s ? num(s[k], d, unit) : '—')));
  return h('table', { class: 'scr-table', 'data-test': 'capacity-states' },
    h('thead', {}, h('tr', {}, h('th', {}, ''), h('th', { scope: 'col' }, 'entering'), h('th', { scope: 'col' }, 'leaving'))),
    h('tbody', {}, line('Dry bulb', 'dry_bulb', 1, t), line('Wet bulb', 'wet_bulb', 1, t), line('Dew point', 'dew_point', 1, t),
      line('RH', 'rel_hum', 0, '%'), line(`Humidity ratio, ${U.hum_ratio || ''}`, 'hum_ratio', 4, ''), line(`Enthalpy, ${U.enthalpy || ''}`, 'enthalpy', 2, '')),
    res.outdoor_db !== undefined && h('tfoot', {}, h('tr', {}, h('th', { scope: 'row' }, 'Outdoor dry bulb'),
      h('td', { colspan: 2, class: 'scr-outdoor' }, `${num(res.outdoor_db, 1, t)} outdoors`))));
}
