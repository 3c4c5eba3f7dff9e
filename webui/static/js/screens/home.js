// Job home: where the walk starts. Systems with their progress and tests,
// instruments with their calibration, the findings, the outbox and (for
// leads) the lead's tools.

import { h, fmt, statusBadge, statusWord, caution, onRoof, kindWord, link, jobHash, agreeText } from '../ui.js';

const FAN_KINDS = new Set(['air_handler', 'rooftop_unit', 'fan']);
const DONE = new Set(['computed', 'meets', 'short', 'no_expected', 'within', 'low', 'high', 'undetermined']);

export function progressText(o) {
  const out = (o.low || 0) + (o.high || 0);
  let t = `${o.read} of ${o.total} read, ${out} out of tolerance`;
  if (o.undetermined) t += `, ${o.undetermined} undetermined`;
  if (o.errors) t += `, ${o.errors} with errors`;
  return t;
}

function testItem(ctx, test, kind, route, label) {
  return h('li', {}, h('a', {
    class: 'item', href: jobHash(ctx, route, test.id), 'data-test': `${kind}-item`, 'data-tag': test.tag, 'data-status': test.status,
  },
  h('span', { class: 'kindword' }, label),
  h('span', { class: 'tag' }, test.tag),
  h('span', { class: 'badges' }, statusBadge(test.status))));
}

function systemCard(ctx, sys, rec, tests) {
  const o = sys.outlets || { total: 0, read: 0 };
  const out = (o.low || 0) + (o.high || 0);
  const pct = o.total ? Math.round((100 * o.read) / o.total) : 0;
  const bar = h('span', {});
  bar.style.width = `${pct}%`;
  const all = [...tests.traverses, ...tests.capacity, ...tests.water];
  const done = all.filter((t) => DONE.has(t.status)).length;
  const units = ctx.view.results.units || {};
  return h('section', { class: 'card system', 'data-test': 'system', 'data-tag': sys.tag },
    h('div', { class: 'sys-head' },
      h('span', { class: 'tag' }, sys.tag),
      h('span', { class: 'kindword' }, kindWord(sys.kind)),
      h('span', { class: 'badges' }, sys.airflow_tolerance ? statusBadge(sys.airflow_tolerance.status, `airflow ${statusWord(sys.airflow_tolerance.status)}`) : null,
        sys.motor_status === 'warning' ? statusBadge('warning', 'motor check') : null)),
    h('p', { class: 'sub' }, sys.name || (rec && rec.location) || ''),
    o.total ? [
      h('div', { class: `progress${out ? ' has-out' : ''}`, role: 'img', 'aria-label': `${pct}% of outlets read` }, bar),
      h('p', { 'data-test': 'system-progress' }, progressText(o)),
    ] : h('p', { class: 'muted' }, 'No outlets on this system.'),
    sys.airflow ? h('p', { class: 'small' }, `Airflow ${fmt(sys.airflow)} ${units.air_flow || ''} of design ${fmt(sys.design_airflow)}`,
      sys.airflow_tolerance ? ` (${fmt(sys.airflow_tolerance.percent_of_design, 1)} %${sys.airflow_tolerance.side_text ? `; ${sys.airflow_tolerance.side_text}` : ''})` : '') : null,
    sys.outlets_vs_traverse ? h('p', { class: 'small', 'data-test': 'outlets-vs-traverse' }, agreeText(sys.outlets_vs_traverse, units.air_flow || ''), statusBadge(sys.outlets_vs_traverse.status)) : null,
    all.length ? h('p', { class: 'small' }, `Tests done: ${done} of ${all.length}`) : null,
    onRoof({ kind: sys.kind, location: rec && rec.location }) ? caution('roof') : null,
    sys.kind === 'pump' ? caution('pump') : null,
    h('div', { class: 'actions' },
      o.total ? link(`Outlets (${o.total})`, jobHash(ctx, 'system', sys.id), { class: 'btn', 'data-test': 'open-outlets', 'data-tag': sys.tag }) : null,
      FAN_KINDS.has(sys.kind) ? link('Fan and motor', jobHash(ctx, 'fan', sys.id), { class: 'btn secondary', 'data-test': 'fan-item', 'data-tag': sys.tag }) : null),
    all.length ? h('ul', { class: 'list tests' },
      tests.traverses.map((t) => testItem(ctx, t, 'traverse', 'traverse', 'Traverse')),
      tests.capacity.map((t) => testItem(ctx, t, 'capacity', 'capacity', 'Capacity test')),
      tests.water.map((t) => testItem(ctx, t, 'water', 'water', 'Water test'))) : null);
}

function instrumentLine(i) {
  let when = '';
  if (i.calibration_due) {
    const d = i.days_to_due;
    if (i.calibration_status === 'overdue') when = `calibration was due ${i.calibration_due}`;
    else if (d !== undefined && d !== null) when = `calibration due ${i.calibration_due} (in ${d} days)`;
    else when = `calibration due ${i.calibration_due}`;
  } else when = 'no calibration date on record';
  return h('li', {}, h('div', { class: 'item', 'data-test': 'instrument-status', 'data-tag': i.tag, 'data-status': i.calibration_status },
    h('span', { class: 'tag' }, i.tag),
    h('span', { class: 'room' }, `${kindWord(i.kind)} · ${when}`),
    h('span', { class: 'badges' }, statusBadge(i.calibration_status))));
}

function findingHash(ctx, f) {
  const s = f.subject || {};
  const route = { outlet: 'outlet', traverse: 'traverse', capacity_test: 'capacity', water_test: 'water', system: 'fan' }[s.kind];
  return route && s.id ? jobHash(ctx, route, s.id) : null;
}

export function render(ctx) {
  const { view } = ctx;
  const res = view.results || {};
  const snap = view.snapshot || {};
  const job = view.job || {};
  const recs = new Map((snap.systems || []).map((s) => [s.id, s]));
  const testsOf = (sysId) => ({
    traverses: (res.traverses || []).filter((t) => (t.system_id || '') === sysId),
    capacity: (res.capacity_tests || []).filter((t) => (t.system_id || '') === sysId),
    water: (res.water_tests || []).filter((t) => (t.system_id || '') === sysId),
  });
  const systems = res.systems || [];
  const loose = testsOf('');
  const c = ctx.outbox.counts(ctx.jobId);
  const instruments = [...(res.instruments || [])].sort((a, b) =>
    rank(a.calibration_status) - rank(b.calibration_status) || a.tag.localeCompare(b.tag, undefined, { numeric: true }));
  const findings = res.findings || [];

  const outboxText = `Outbox: ${c.waiting} waiting` + (c.rejected ? `, ${c.rejected} rejected` : '') + (c.sent ? `, ${c.sent} sent` : '');

  return h('div', { 'data-test': 'job-home' },
    h('div', { class: 'screen-head' },
      h('h1', {}, job.name),
      h('p', { class: 'sub' }, [job.site_address, job.units === 'si' ? 'SI units' : 'IP units', job.status].filter(Boolean).join(' · '))),
    h('div', { class: 'actions' },
      link(outboxText, jobHash(ctx, 'outbox'), { class: `btn ${c.rejected ? 'danger' : 'secondary'}`, 'data-test': 'open-outbox' }),
      ctx.role === 'lead' ? link('Set up the job', jobHash(ctx, 'setup'), { class: 'btn', 'data-test': 'open-setup' }) : null,
      ctx.role === 'lead' ? link('Lead: codes, devices, import', jobHash(ctx, 'lead'), { class: 'btn secondary', 'data-test': 'open-lead' }) : null,
      link(ctx.role === 'lead' ? 'Report: preview and sign' : 'Signed reports', jobHash(ctx, 'signoff'), { class: 'btn secondary', 'data-test': 'open-signoff' })),
    h('div', { class: 'cols' },
      h('div', {},
        h('h2', { class: 'screen-head' }, 'Systems'),
        systems.length ? systems.map((s) => systemCard(ctx, s, recs.get(s.id), testsOf(s.id)))
          : h('section', { class: 'card', 'data-test': 'no-systems' }, h('p', {}, ctx.role === 'lead'
            ? 'No systems yet: add them under Set up the job, or import the schedule from the lead screen.'
            : 'No systems yet: the lead adds them.')),
        loose.traverses.length + loose.capacity.length + loose.water.length ? h('section', { class: 'card' },
          h('h2', {}, 'Other tests'),
          h('ul', { class: 'list tests' },
            loose.traverses.map((t) => testItem(ctx, t, 'traverse', 'traverse', 'Traverse')),
            loose.capacity.map((t) => testItem(ctx, t, 'capacity', 'capacity', 'Capacity test')),
            loose.water.map((t) => testItem(ctx, t, 'water', 'water', 'Water test')))) : null),
      h('div', {},
        h('section', { class: 'card' },
          h('h2', {}, 'Instruments'),
          instruments.some((i) => i.calibration_status === 'overdue')
            ? h('p', { class: 'msg msg-error' }, 'An instrument is past its calibration date: readings taken with it are flagged in the report.') : null,
          instruments.length ? h('ul', { class: 'list' }, instruments.map(instrumentLine)) : h('p', {}, 'No instruments listed for this job.')),
        h('section', { class: 'card' },
          h('h2', {}, 'Findings'),
          findings.length ? h('ul', { class: 'list' }, findings.map((f) => {
            const href = findingHash(ctx, f);
            const body = [h('span', { class: 'room' }, f.text)];
            return h('li', {}, href
              ? h('a', { class: 'item', href, 'data-test': 'finding', 'data-kind': f.kind }, body)
              : h('div', { class: 'item', 'data-test': 'finding', 'data-kind': f.kind }, body));
          })) : h('p', {}, (snap.readings || []).length
            ? 'No findings: everything read is within tolerance.' : 'No findings yet: nothing has been read.')))));
}

function rank(s) { return { overdue: 0, due_soon: 1, unknown: 2, current: 3 }[s] ?? 2; }
