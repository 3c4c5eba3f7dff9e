// The lead's editor for a job and each kind of design record, saved with the
// server's own validation, its errors beside the field they name. Routes:
// #/new-job, #/job/J/edit/job, #/job/J/edit/KIND/ID (ID "new"; ?system= presets it).

import { h, button, message, kindWord } from '../ui.js';
import { enc } from '../api.js';
import { form } from '../form.js';
import { errorText } from '../labels.js';

// Groups: [title, fields, hint]. A field is "key" (text) or "key:type:unit",
// type n number, i whole number, s choice, d date, a long text; unit "@x" is
// the job's unit for x. Choices, conditions and hints are in X below.
const R = ['Remarks', 'remarks'];
const GROUPS = {
  job: [['The job', 'name project_number site_address client engineer contractor tab_firm'],
    ['Units and air pressure', 'units:s _air:s elevation:n barometric:n', 'For air density; a measured pressure is the better figure.'],
    ['Tolerances, % of design', 'outlet_low_pct outlet_high_pct fan_low_pct fan_high_pct hydronic_low_pct hydronic_high_pct'.replace(/(\w+)/g, 'tolerances.$1:n:%'),
      'Defaults are common practice; the project specification governs.'], R],
  system: [['System', 'tag kind:s name location'],
    ['Design figures', 'airflow:n:@air_flow outdoor_air:n:@air_flow external_static:n:@duct_pressure rated_total:n:@power rated_sensible:n:@power water_flow:n:@water_flow', 'From the schedule; leave empty what does not apply.'],
    ['Unit nameplate', 'make model serial'],
    ['Motor nameplate', 'motor_make motor_hp:n volts:n:V phase:s fla:n:A motor_rpm:n:rpm motor_frame service_factor:n'],
    ['Drive', 'fan_rpm:n:rpm fan_sheave_size fan_sheave_pitch:n:@length motor_sheave_size motor_sheave_pitch:n:@length belts fan_bushing motor_bushing',
      'Lock out and tag out before reading sheaves and belts. Sheaves as stamped, pitch diameters as set.'],
    ['Filters', 'filters'], ['Performance table (optional)', 'perf_table_csv:a', "The maker's table as CSV, for capacity at test conditions."], R]
    .map(([t, f, x]) => [t, t === 'System' || t === 'Remarks' ? f : f.replace(/(\S+)/g, 'design.$1'), x]),
  instrument: [['Instrument', 'tag kind:s make model serial'],
    ['Calibration and accuracy', 'calibrated_on:d calibration_due:d accuracy_pct:n:% accuracy_abs:n accuracy_unit', 'From the calibration certificate.'], R],
  outlet: [['Outlet', 'system_id:s tag room kind:s size design_flow:n:@air_flow method:s factor:n ak:n:@area'], R],
  traverse: [['Traverse', 'system_id:s tag location shape:s method:s width:n:@length height:n:@length diameter:n:@length points_w:i points_h:i points_per_diameter:i diameters:i'], R],
  capacity_test: [['Capacity test', 'system_id:s tag mode:s flow_source:s traverse_id:s flow_basis:s'], R],
  water_test: [['Water test', 'system_id:s tag mode:s flow_source:s valve_cv:n valve_accuracy_pct:n:% fluid:s concentration:n design_flow:n:@water_flow capacity_test_id:s'], R],
};

const AIR = new Set(['air_handler', 'rooftop_unit', 'fan']);
const air = (v) => AIR.has(v.kind);
const is = (k, x) => (v) => v[k] === x;
const isnt = (k, x) => (v) => v[k] !== x;
const ip = (c) => c.units !== 'si';
const o = (...xs) => xs.map((x) => (Array.isArray(x) ? x : [x, kindWord(x)]));
const sys = (c) => o(...(c.view.snapshot.systems || []).map((s) => [s.id, `${s.tag} · ${s.name || kindWord(s.kind)}`]));
const tags = (c, k, none) => {
  const ts = (c.view.snapshot[k] || []).map((t) => [t.id, t.tag]);
  return none === 'None' || !ts.length ? [['', none], ...ts] : ts;
};

// X[kind](ctx, rec) → extras per key: choices o, condition show, hint, label
// l, unit u, opt (left out when empty), zero (0 shown), int (choice is a number).
const X = {
  job: (c, rec) => {
    const locked = !!c.view && ['systems', 'instruments'].some((k) => (c.view.snapshot[k] || []).length);
    const si = is('units', 'si');
    const x = {
      units: { o: o(['ip', 'IP: cfm, in. w.g., °F'], ['si', 'SI: L/s, Pa, °C']), disabled: locked,
        hint: locked ? `Locked: the job holds design data in ${rec.units === 'si' ? 'SI' : 'IP'} units.` : 'Cannot be changed once the job holds design data.' },
      _air: { o: o(['elevation', 'Site elevation'], ['barometric', 'Measured pressure']), l: 'Air pressure from' },
      elevation: { u: (v) => (si(v) ? 'm' : 'ft'), opt: 1, zero: 1, show: is('_air', 'elevation') },
      barometric: { u: (v) => (si(v) ? 'kPa' : 'psia'), opt: 1, show: is('_air', 'barometric'),
        hint: "Station pressure (absolute) read at the site, not the weather service's sea-level figure." },
    };
    for (const k of ['outlet', 'fan', 'hydronic']) for (const s of ['low', 'high']) x[`tolerances.${k}_${s}_pct`] = { zero: 1 };
    return x;
  },
  system: (c) => {
    const x = {
      kind: { o: o('air_handler', 'rooftop_unit', 'fan', 'pump', 'water_loop') },
      'design.motor_hp': { u: ip(c) ? 'hp' : 'kW' }, 'design.phase': { o: o(['0', 'Not given'], ['1', 'Single phase'], ['3', 'Three phase']), int: 1 },
      'design.water_flow': { show: (v) => !air(v) },
    };
    for (const k of ['airflow', 'outdoor_air', 'external_static', 'rated_sensible']) x[`design.${k}`] = { show: air };
    return x;
  },
  instrument: () => ({
    kind: { o: o('flow_hood', 'anemometer', 'manometer', 'pitot_tube', 'thermometer', 'hygrometer', 'psychrometer', 'tachometer', 'clamp_meter', 'multimeter', 'hydronic_meter', 'flow_meter', 'other') },
    accuracy_unit: { hint: 'e.g. cfm, °F, %RH' },
  }),
  outlet: (c) => ({
    system_id: { o: sys(c) }, kind: { o: o('supply', 'return', 'exhaust', 'outdoor_air') },
    size: { hint: ip(c) ? 'e.g. 24×24 in (neck)' : 'e.g. 600×600 mm (neck)' }, method: { o: o(['hood', 'Flow hood × correction factor'], ['ak', 'Velocity × Ak']) },
    factor: { show: is('method', 'hood'), hint: '1 when the hood reads the outlet as it is' }, ak: { show: is('method', 'ak') },
  }),
  traverse: (c) => {
    const x = {
      system_id: { o: sys(c) }, shape: { o: o(['rect', 'Rectangular'], ['round', 'Round']) },
      method: { o: o(['log-tchebycheff', 'Log-Tchebycheff'], ['log-linear', 'Log-linear (round only)'], ['equal-area', 'Equal area']),
        hint: 'Rectangular: log-Tchebycheff takes 5, 6 or 7 points per line and 5 to 7 lines; equal area 1 to 30 each. Round: log-Tchebycheff and log-linear take 6 or 8 points per diameter, equal area an even number 2 to 24; 1 to 4 diameters.' },
    };
    for (const k of ['width', 'height', 'points_w', 'points_h']) x[k] = { show: is('shape', 'rect') };
    for (const k of ['diameter', 'points_per_diameter', 'diameters']) x[k] = { show: is('shape', 'round') };
    return x;
  },
  capacity_test: (c) => ({
    system_id: { o: sys(c) }, mode: { o: o('cooling', 'heating') },
    flow_source: { o: o(['outlets', "Sum of the system's outlets"], ['traverse', 'A duct traverse'], ['direct', 'A direct reading']) },
    traverse_id: { o: tags(c, 'traverses', 'No traverse yet: add one first'), show: is('flow_source', 'traverse') },
    flow_basis: { o: o(['standard', 'Standard air'], ['enter', 'Entering air'], ['leave', 'Leaving air']), show: is('flow_source', 'direct') },
  }),
  water_test: (c) => ({
    system_id: { o: sys(c) },
    mode: { o: o(['', 'Choose: cooling or heating'], 'cooling', 'heating'), hint: 'What the coil or circuit does; results and cautions follow it.' },
    flow_source: { o: o(['valve', 'Balancing valve (coefficient and ΔP)'], ['meter', 'Flow meter']) },
    valve_cv: { show: is('flow_source', 'valve'), l: ip(c) ? 'Valve Cv' : 'Valve Kv', hint: ip(c) ? 'gpm at 1 psi' : 'm³/h at 1 bar' },
    valve_accuracy_pct: { show: is('flow_source', 'valve'), opt: 1, hint: 'Leave empty for the common-practice default' },
    fluid: { o: o(['water', 'Water'], ['pg', 'Propylene glycol'], ['eg', 'Ethylene glycol']) }, concentration: { show: isnt('fluid', 'water'), u: '% by volume' },
    capacity_test_id: { o: tags(c, 'capacity_tests', 'None') },
  }),
};

// kind → [title, API path, snapshot list, blank record]
const KINDS = {
  job: ['Job', '', '', () => ({ units: 'ip', tolerances: { outlet_low_pct: 10, outlet_high_pct: 10, fan_low_pct: 5, fan_high_pct: 10, hydronic_low_pct: 10, hydronic_high_pct: 10 } })],
  system: ['System', 'systems', 'systems', () => ({ kind: 'air_handler', design: {} })],
  instrument: ['Instrument', 'instruments', 'instruments', () => ({ kind: 'flow_hood' })],
  outlet: ['Outlet', 'outlets', 'outlets', (c) => ({ system_id: c.params.system, kind: 'supply', method: 'hood', factor: 1 })],
  traverse: ['Traverse', 'traverses', 'traverses', (c) => ({ system_id: c.params.system, shape: 'rect', method: 'log-tchebycheff', points_w: 5, points_h: 5 })],
  capacity_test: ['Capacity test', 'capacity-tests', 'capacity_tests', (c) => ({ system_id: c.params.system, mode: 'cooling', flow_source: 'outlets' })],
  water_test: ['Water test', 'water-tests', 'water_tests', (c) => ({ system_id: c.params.system, mode: '', flow_source: 'valve', fluid: 'water' })],
};

function specs(kind, ctx, rec) {
  const x = X[kind](ctx, rec);
  const U = (ctx.view && ctx.view.results.units) || {};
  return GROUPS[kind].map(([title, f, hint]) => ({ title, hint, fields: f.split(' ').map((s) => {
    const [k, t, u] = s.split(':');
    const e = x[k] || {};
    return { k, t: { n: 'num', i: 'int', s: 'sel', d: 'date', a: 'area' }[t], u: u && u[0] === '@' ? U[u.slice(1)] : u, ...e, max: k === 'remarks' ? '500' : null };
  }) }));
}

let kept = null; // {key, e}: the last error, shown again after a re-render of the same form
let armed = {}; // {id, until}: a first tap on Delete
window.addEventListener('hashchange', () => { kept = null; armed = {}; });

export async function render(ctx) {
  const kind = ctx.params.kind || 'job';
  const [title, path, list, blank] = KINDS[kind] || [];
  const back = ctx.jobId ? `#/job/${enc(ctx.jobId)}/setup` : '#/jobs';
  if (ctx.role !== 'lead' || !title) {
    return h('section', { class: 'card', 'data-test': 'lead-denied' }, h('h2', {}, 'For the lead'),
      h('p', {}, ctx.role !== 'lead' ? 'Ask your lead to set up the job in the app.' : 'No such kind of record.'));
  }
  const isNew = kind === 'job' ? !ctx.jobId : ctx.params.id === 'new';
  const rec = kind === 'job' ? (isNew ? blank(ctx) : ctx.view.job)
    : isNew ? blank(ctx) : (ctx.view.snapshot[list] || []).find((r) => r.id === ctx.params.id);
  if (!rec) return h('section', { class: 'card' }, h('h2', {}, `${title} not found`), h('p', {}, 'It may have been deleted.'), h('a', { class: 'btn', href: back }, 'Back'));
  const f = form(kind, specs(kind, ctx, rec), { ...rec, _air: rec.barometric != null ? 'barometric' : 'elevation' });
  const top = h('div', { 'aria-live': 'polite' });
  const key = location.hash;
  const fail = (e) => {
    kept = { key, e };
    if (!f.show(e)) top.replaceChildren(message('error', errorText(kind, e), { 'data-test': 'edit-error' }));
  };
  const base = kind === 'job' ? '/jobs' : `/jobs/${enc(ctx.jobId)}/${path}`;
  const save = button(isNew ? `Add the ${title.toLowerCase()}` : 'Save', { class: 'btn big', 'data-test': 'edit-save' }, async () => {
    f.clear();
    top.replaceChildren();
    kept = null;
    let body;
    try { body = f.read(); } catch (e) { fail(e); return; }
    delete body._air;
    save.disabled = true;
    try {
      const res = isNew ? await ctx.api.post(base, body) : await ctx.api.put(`${base}/${enc(rec.id)}`, body);
      if (kind === 'job' && isNew) { ctx.go(`#/job/${enc(res.id)}/setup`); return; }
      await ctx.sync.refresh();
      ctx.go(back);
    } catch (e) { fail(e); } finally { save.disabled = false; }
  });
  // A second tap within 5 s confirms: a deleted record leaves the job and the
  // report. The first tap is kept here, so a sync update's redraw keeps it.
  const again = `Tap again to delete ${rec.tag}`;
  const del = isNew || kind === 'job' ? null : button(armed.id === rec.id && armed.until > Date.now() ? again : 'Delete', { class: 'btn danger', 'data-test': 'edit-delete' }, async () => {
    if (!(armed.id === rec.id && armed.until > Date.now())) {
      armed = { id: rec.id, until: Date.now() + 5000 };
      del.textContent = again;
      setTimeout(() => { if (del.isConnected) del.textContent = 'Delete'; }, 5000);
      return;
    }
    armed = {};
    try { await ctx.api.del(`${base}/${enc(rec.id)}`); await ctx.sync.refresh(); ctx.go(back); } catch (e) { fail(e); }
  });
  const el = h('div', { 'data-test': 'edit-screen', 'data-kind': kind },
    h('div', { class: 'screen-head' }, h('h1', {}, isNew ? `New ${title.toLowerCase()}` : `${title} ${rec.tag || rec.name || ''}`),
      ctx.view ? h('p', { class: 'sub' }, ctx.view.job.name) : null),
    top, h('section', { class: 'card' }, f.el, h('div', { class: 'actions' }, save, del)));
  if (kept && kept.key === key) queueMicrotask(() => fail(kept.e));
  return el;
}
