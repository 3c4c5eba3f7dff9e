// One outlet: a big entry for the hood (or velocity) reading and the server's
// result for as found and final; "Next outlet" walks the list.

import { h, fmt, sideLine, statusBadge, numberField, select, parseNumber, clean, kindWord, timeText, caution, link, jobHash, put, fill } from '../ui.js';
import { nextOutlet } from './outlets.js';
import { screenState, instrumentSelect, pmText } from './entry.js';
import { pendingOf, head, far, ask, noteInput, fixButtons, fixForm, historyView } from './fix.js';

// Instrument kinds that read each outlet quantity, most likely first.
const PREFERRED = { flow: ['flow_hood'], velocity: ['anemometer', 'pitot_tube', 'multimeter', 'other'] };
const lastSaved = new Map(); // outlet id → the value saved last, so its line survives a re-render

// expected: reading v in design units, NaN for units the app does not pair.
function expected(ctx, rec, quantity, unit, v) {
  const air = (ctx.view.results.units || {}).air_flow, u = ctx.q.label(unit);
  if (quantity === 'flow') return u === air ? v * (rec.factor || 1) : NaN;
  if (!(rec.ak > 0)) return NaN;
  return u === 'fpm' && air === 'cfm' ? v * rec.ak : u === 'm/s' && air === 'L/s' ? v * rec.ak * 1000 : NaN;
}

function stageBlock(ctx, stage, r, o, quantity, rec) {
  const u = ctx.view.results.units || {};
  const word = stage === 'as_found' ? 'As found' : 'Final';
  // The reading that counts for this stage (or will, once sent): Correct and Void act on it.
  const hd = head(ctx, 'outlet', o.id, [quantity], 0, stage);
  const check = (v, x) => [far(expected(ctx, rec, quantity, x.unit, v), o.design_flow, `the design ${fmt(o.design_flow)} ${u.air_flow || ''}`)];
  const fix = hd && (fixForm(ctx, hd, { check }) || fixButtons(ctx, hd));
  if (!r) {
    return h('div', { class: 'stage-result', 'data-test': 'outlet-stage', 'data-stage': stage, 'data-status': 'not_read' },
      h('div', { class: 'row' }, h('h3', { class: 'grow' }, word), statusBadge(hd ? 'waiting' : 'not_read')), fix);
  }
  const t = r.tolerance;
  const readUnit = quantity === 'velocity' ? u.velocity : u.air_flow;
  const instr = (ctx.view.snapshot.instruments || []).find((i) => i.id === r.instrument_id);
  return h('div', { class: 'stage-result', 'data-test': 'outlet-stage', 'data-stage': stage, 'data-status': r.status },
    h('div', { class: 'row' }, h('h3', { class: 'grow' }, word), statusBadge(r.status)),
    h('div', { class: 'flow', 'data-test': 'outlet-flow' }, r.flow !== undefined && r.flow !== null ? `${fmt(r.flow)} ${u.air_flow || ''}` : '—'),
    t ? h('p', {}, `${fmt(t.percent_of_design, 1)} % of design ${fmt(o.design_flow)} ${u.air_flow || ''}`) : null,
    t ? h('p', { class: 'band' }, `band ${fmt(t.low)}–${fmt(t.high)} ${u.air_flow || ''}${pmText(t, u.air_flow || '')}`) : null, sideLine(t),
    h('p', { class: 'small muted' }, `read ${fmt(r.reading)} ${readUnit || ''}` + (instr ? ` with ${instr.tag}` : '') + (r.taken_at ? ` at ${timeText(r.taken_at)}` : '')),
    fix);
}

// latestLine: the result of the value just saved, under Save: no scrolling.
function latestLine(ctx, o, n, entry, inView) {
  if (!n || Date.now() - n.at > 120000 || (entry && entry.state === 'rejected')) return null;
  const r = o[n.stage];
  const done = r && (r.reading_id === n.entryId || (!entry && inView.has(r.reading_id)));
  // Sent, in the view's past, and no longer a current reading: corrected or
  // voided since, so there is no result of it to wait for.
  if (!done && !entry && !inView.has(n.entryId)) return null;
  const u = (ctx.view.results.units || {}).air_flow || '';
  return h('div', { class: 'latest', 'data-test': 'outlet-latest', 'data-status': done ? r.status : 'waiting' },
    done
      ? [h('strong', { class: 'latest-flow' }, `${fmt(r.flow)} ${u}`), ' ',
        r.tolerance ? `${fmt(r.tolerance.percent_of_design, 0)} % of design ` : '', statusBadge(r.status), sideLine(r.tolerance)]
      : `Saved ${n.what}. ${entry && entry.state === 'waiting' ? 'Waiting to send.' : 'Waiting for the result.'}`);
}

export function render(ctx) {
  const id = ctx.params.id;
  const { view, q, outbox } = ctx;
  const rec = (view.snapshot.outlets || []).find((o) => o.id === id);
  const o = (view.results.outlets || []).find((x) => x.id === id);
  if (!rec || !o) {
    return h('section', { class: 'card problem', 'data-test': 'screen-error' },
      h('h2', {}, 'Outlet not found'), h('p', {}, 'It may have been deleted by the lead.'), link('Back to the job', jobHash(ctx), { class: 'btn' }));
  }
  const u = view.results.units || {};
  const quantity = rec.method === 'ak' ? 'velocity' : 'flow';
  const unit = q.unitFor('outlet', quantity, ctx.units);
  const sys = (view.results.systems || []).find((s) => s.id === o.system_id);

  const inView = new Set((view.snapshot.readings || []).map((r) => r.id));
  const mine = outbox.forSubject(ctx.jobId, 'outlet', id);
  const pending = pendingOf(ctx, 'outlet', id);

  // Instruments: the one used last for this kind, else a current one of a likely kind.
  const st = screenState(ctx, 'outlet', id);
  const instrPick = instrumentSelect(ctx, st, 'main', PREFERRED[quantity]);
  const hasAsFound = !!o.as_found || mine.some((e) => e.reading.stage === 'as_found' && e.state !== 'rejected');
  const stageSel = select({ id: 'stage', 'data-test': 'stage' }, [['as_found', 'As found'], ['final', 'Final']], hasAsFound ? 'final' : 'as_found');

  const entry = numberField({
    test: 'reading-value',
    label: quantity === 'velocity' ? 'Velocity' : 'Hood reading',
    unit: q.label(unit),
    hint: quantity === 'velocity'
      ? `Multiplied by Ak ${fmt(rec.ak, 3)} ${u.area || ''} by the server.`
      : (rec.factor && rec.factor !== 1 ? `As the hood shows it; the server multiplies by the hood correction factor ${fmt(rec.factor, 3)}.` : 'As the hood shows it.'),
  });
  const err = h('p', { class: 'msg msg-error', role: 'alert', 'data-test': 'reading-error', hidden: true });
  const saved = h('div', { role: 'status', 'data-test': 'reading-saved' });
  const note = lastSaved.get(id);
  if (note) put(saved, latestLine(ctx, o, note, outbox.get(note.entryId), inView));
  const remark = noteInput('reading-note');
  const askBox = h('div', { 'aria-live': 'polite' });
  const saveBtn = h('button', { type: 'submit', class: 'btn big', 'data-test': 'reading-save' }, 'Save');

  const resultStatus = pending.length ? 'waiting' : o.status;
  const result = h('div', { class: 'result', 'data-test': 'outlet-result', 'data-status': resultStatus, 'aria-live': 'polite' },
    stageBlock(ctx, 'as_found', o.as_found, o, quantity, rec),
    stageBlock(ctx, 'final', o.final, o, quantity, rec));

  async function onSave(ev) {
    ev.preventDefault();
    err.hidden = true;
    const v = parseNumber(entry.input.value);
    if (v === null) {
      err.textContent = entry.input.value.trim() ? `“${entry.input.value}” is not a number. Type digits, e.g. 412 or 0.35.` : 'Type the reading first.';
      err.hidden = false;
      entry.input.focus();
      return;
    }
    const stage = stageSel.value;
    const why = far(expected(ctx, rec, quantity, unit, v), o.design_flow, `the design ${fmt(o.design_flow)} ${u.air_flow || ''}`);
    if (why && !(await ask(askBox, [`${fmt(v)} ${q.label(unit)} is ${why}.`]))) { entry.input.focus(); return; }
    saveBtn.disabled = true;
    const before = result.dataset.status;
    result.dataset.status = 'waiting'; // at once: the old status must not read as this value's
    const instrument = st.inst.main;
    const typed = entry.input.value;
    entry.input.value = ''; // at once: a redraw meanwhile must not bring it back to be saved twice
    clean(entry.input);
    let row;
    try {
      row = await outbox.add(ctx.jobId, {
        subject_kind: 'outlet', subject_id: id, quantity, point: 0, value: v, unit, stage, instrument_id: instrument,
        note: remark.input.value.trim(), confirmed: !!why,
      });
    } catch (e) {
      saveBtn.disabled = false;
      result.dataset.status = before;
      entry.input.value = typed;
      err.textContent = `Not saved on this device: ${e.message || e}. Try again.`;
      err.hidden = false;
      return;
    }
    remark.input.value = '';
    clean(remark.input);
    clean(stageSel);
    saveBtn.disabled = false;
    const n = { what: `${fmt(v)} ${q.label(unit)} (${kindWord(stage)})`, entryId: row && row.id, at: Date.now(), stage };
    lastSaved.set(id, n);
    fill(saved, latestLine(ctx, o, n, row, inView));
  }

  const next = nextOutlet(ctx, o.system_id, id);
  const factText = rec.method === 'ak' ? `Ak ${fmt(rec.ak, 3)} ${u.area || ''}` : `× ${fmt(rec.factor || 1, 3)}`;

  return h('div', { 'data-test': 'outlet-screen', 'data-tag': o.tag },
    h('div', { class: 'screen-head' },
      h('h1', { 'data-test': 'outlet-tag' }, o.tag),
      h('p', { class: 'sub' }, [sys && sys.tag, o.room, kindWord(o.kind), rec.size].filter(Boolean).join(' · ')),
      h('p', { class: 'sub' }, `Design ${fmt(o.design_flow)} ${u.air_flow || ''} · ${rec.method === 'ak' ? 'velocity × Ak' : 'hood'} ${factText}`)),
    caution('ladder'),
    h('div', { class: 'cols' },
      h('div', {}, h('form', { class: 'card', on: { submit: onSave }, novalidate: true, 'data-test': 'reading-form' },
        entry.el,
        h('div', { class: 'form-grid' },
          h('div', { class: 'field' }, h('label', { for: 'stage' }, 'Stage'), stageSel),
          instrPick),
        remark.el,
        err,
        askBox,
        saveBtn,
        saved),
      h('div', { class: 'next-row' },
        link('All outlets', jobHash(ctx, 'system', o.system_id), { class: 'btn secondary' }),
        next
          ? link(`Next outlet: ${next.tag} ›`, jobHash(ctx, 'outlet', next.id), { class: 'btn', 'data-test': 'next-outlet', 'data-tag': next.tag })
          : h('p', { class: 'hint end-of-list', 'data-test': 'end-of-list' }, 'Last outlet in this list.'))),
      h('div', {}, h('section', { class: 'card' },
        h('div', { class: 'row' }, h('h2', { class: 'grow' }, 'Result'), statusBadge(resultStatus)),
        result,
        (o.flags || []).length ? h('ul', { class: 'flags', 'data-test': 'outlet-flags' }, o.flags.map((f) => h('li', { 'data-kind': f.kind }, f.text))) : null,
        (o.errors || []).length ? h('ul', { class: 'flags' }, o.errors.map((e) => h('li', {}, e))) : null),
      historyView(ctx, 'outlet', id, { check: (v, x) => [far(expected(ctx, rec, quantity, x.unit, v), o.design_flow, 'the design flow')] }))),
    ctx.role === 'lead' ? h('p', {}, link('Edit the design data', `${jobHash(ctx, 'lead')}?outlet=${encodeURIComponent(id)}`, { class: 'btn secondary' })) : null);
}
