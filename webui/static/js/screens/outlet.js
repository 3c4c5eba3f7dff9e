// One outlet: its design data, a big entry for the hood (or velocity)
// reading, the instrument and stage, and the server's result for as found
// and final. "Next outlet" walks the list without going back to it.

import { h, fmt, statusBadge, numberField, select, parseNumber, clean, kindWord, timeText, caution, message, link, jobHash } from '../ui.js';
import { nextOutlet } from './outlets.js';

// Instrument kinds that read each outlet quantity, most likely first.
const PREFERRED = { flow: ['flow_hood'], velocity: ['anemometer', 'pitot_tube', 'multimeter', 'other'] };
const lastSaved = new Map(); // outlet id → {text, at}, so the note survives a re-render

// savedText: what became of the last value saved here.
function savedText(note, entry, inView) {
  if (entry && entry.state === 'rejected') return '';
  if (entry && entry.state === 'waiting') return `Saved ${note.what} on this device; waiting to send.`;
  if (entry && !inView.has(entry.id)) return `Sent ${note.what}; waiting for the result.`;
  return `Saved ${note.what}; the server's result is shown.`;
}

// pickInstrument: the one used last for this kind of reading, else the first
// current one of a likely kind.
function pickInstrument(ctx, quantity, instruments, cal) {
  const kindKey = `instrumentKind:outlet:${quantity}`;
  const kinds = [ctx.store.metaSync(kindKey), ...PREFERRED[quantity]].filter((k) => k !== null && k !== undefined);
  if (kinds[0] === 'none') return '';
  for (const k of kinds) {
    const id = ctx.store.metaSync(`instrument:${k}`);
    if (id && instruments.some((i) => i.id === id)) return id;
  }
  for (const k of kinds) {
    const i = instruments.find((x) => x.kind === k && (cal.get(x.id) || {}).calibration_status !== 'overdue');
    if (i) return i.id;
  }
  return '';
}

function stageBlock(ctx, stage, r, o, quantity) {
  const u = ctx.view.results.units || {};
  const word = stage === 'as_found' ? 'As found' : 'Final';
  if (!r) {
    return h('div', { class: 'stage-result', 'data-test': 'outlet-stage', 'data-stage': stage, 'data-status': 'not_read' },
      h('div', { class: 'row' }, h('h3', { class: 'grow' }, word), statusBadge('not_read')));
  }
  const t = r.tolerance;
  const readUnit = quantity === 'velocity' ? u.velocity : u.air_flow;
  const instr = (ctx.view.snapshot.instruments || []).find((i) => i.id === r.instrument_id);
  return h('div', { class: 'stage-result', 'data-test': 'outlet-stage', 'data-stage': stage, 'data-status': r.status },
    h('div', { class: 'row' }, h('h3', { class: 'grow' }, word), statusBadge(r.status)),
    h('div', { class: 'flow', 'data-test': 'outlet-flow' }, r.flow !== undefined && r.flow !== null ? `${fmt(r.flow)} ${u.air_flow || ''}` : '—'),
    t ? h('p', {}, `${fmt(t.percent_of_design, 1)} % of design ${fmt(o.design_flow)} ${u.air_flow || ''}`) : null,
    t ? h('p', { class: 'band' }, `band ${fmt(t.low)}–${fmt(t.high)} ${u.air_flow || ''}, ± ${fmt(t.uncertainty)} ${u.air_flow || ''} from the instrument`) : null,
    h('p', { class: 'small muted' }, `read ${fmt(r.reading)} ${readUnit || ''}` + (instr ? ` with ${instr.tag}` : '') + (r.taken_at ? ` at ${timeText(r.taken_at)}` : '')));
}

export function render(ctx) {
  const id = ctx.params.id;
  const { view, q, outbox, store } = ctx;
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

  // Entries of this outlet the server's view does not show yet.
  const inView = new Set((view.snapshot.readings || []).map((r) => r.id));
  const mine = outbox.forSubject(ctx.jobId, 'outlet', id);
  const pending = mine.filter((e) => e.state !== 'rejected' && !inView.has(e.id));
  const rejected = mine.filter((e) => e.state === 'rejected');

  // Instruments, with the server's calibration status.
  const cal = new Map((view.results.instruments || []).map((i) => [i.id, i]));
  const instruments = [...(view.snapshot.instruments || [])].sort((a, b) => {
    const pa = PREFERRED[quantity].indexOf(a.kind), pb = PREFERRED[quantity].indexOf(b.kind);
    return (pa < 0 ? 99 : pa) - (pb < 0 ? 99 : pb) || a.tag.localeCompare(b.tag, undefined, { numeric: true });
  });
  const instrSel = select({ id: 'instrument', 'data-test': 'instrument' },
    [['', 'No instrument'], ...instruments.map((i) => {
      const st = (cal.get(i.id) || {}).calibration_status;
      return [i.id, `${i.tag} (${kindWord(i.kind)})${st === 'overdue' ? ' — calibration overdue' : ''}`];
    })],
    pickInstrument(ctx, quantity, instruments, cal));
  const instrWarn = h('p', { class: 'msg msg-error', 'data-test': 'instrument-warning', hidden: true });
  const paintInstrWarn = () => {
    const c = cal.get(instrSel.value);
    instrWarn.hidden = !(c && c.calibration_status === 'overdue');
    if (c) instrWarn.textContent = `${c.tag} is past its calibration date (${c.calibration_due}); readings taken with it are flagged.`;
  };
  instrSel.addEventListener('change', paintInstrWarn);
  paintInstrWarn();

  const hasAsFound = !!o.as_found || mine.some((e) => e.reading.stage === 'as_found' && e.state !== 'rejected');
  const stageSel = select({ id: 'stage', 'data-test': 'stage' }, [['as_found', 'As found'], ['final', 'Final']], hasAsFound ? 'final' : 'as_found');

  const entry = numberField({
    test: 'reading-value',
    label: quantity === 'velocity' ? 'Velocity' : 'Hood reading',
    unit: q.label(unit),
    hint: quantity === 'velocity'
      ? `Multiplied by Ak ${fmt(rec.ak, 3)} ${u.area || ''} by the server.`
      : (rec.factor && rec.factor !== 1 ? `As the hood shows it; the server multiplies by the factor ${fmt(rec.factor, 3)}.` : 'As the hood shows it.'),
  });
  const err = h('p', { class: 'msg msg-error', role: 'alert', 'data-test': 'reading-error', hidden: true });
  const saved = h('p', { class: 'msg msg-ok', role: 'status', 'data-test': 'reading-saved' });
  const note = lastSaved.get(id);
  if (note && Date.now() - note.at < 120000) saved.textContent = savedText(note, outbox.get(note.entryId), inView);
  const saveBtn = h('button', { type: 'submit', class: 'btn big', 'data-test': 'reading-save' }, 'Save');

  const resultStatus = pending.length ? 'waiting' : o.status;
  const result = h('div', { class: 'result', 'data-test': 'outlet-result', 'data-status': resultStatus, 'aria-live': 'polite' },
    pending.map((e) => h('p', { class: 'pending', 'data-test': 'outlet-pending' },
      `${e.state === 'sent' ? 'Sent, waiting for the result' : 'Waiting to send'}: ${fmt(e.reading.value)} ${q.label(e.reading.unit)}, ${kindWord(e.reading.stage)} (entered ${timeText(e.created)}).`)),
    rejected.map((e) => h('div', { class: 'pending rejected', 'data-test': 'outlet-rejected' },
      h('p', {}, `Rejected: ${fmt(e.reading.value)} ${q.label(e.reading.unit)}, ${kindWord(e.reading.stage)}: ${e.reason}`),
      link('Fix or discard it in the outbox', jobHash(ctx, 'outbox'), { class: 'btn danger' }))),
    stageBlock(ctx, 'as_found', o.as_found, o, quantity),
    stageBlock(ctx, 'final', o.final, o, quantity));

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
    saveBtn.disabled = true;
    const before = result.dataset.status;
    result.dataset.status = 'waiting'; // at once: the old status must not read as this value's
    const stage = stageSel.value;
    const instrument = instrSel.value;
    let row;
    try {
      row = await outbox.add(ctx.jobId, {
        subject_kind: 'outlet', subject_id: id, quantity, point: 0, value: v, unit, stage, instrument_id: instrument,
      });
    } catch (e) {
      saveBtn.disabled = false;
      result.dataset.status = before;
      err.textContent = `Not saved on this device: ${e.message || e}. Try again.`;
      err.hidden = false;
      return;
    }
    // Clear at once (before any re-render) so the value cannot be saved twice.
    entry.input.value = '';
    clean(entry.input);
    clean(stageSel);
    saveBtn.disabled = false;
    const n = { what: `${fmt(v)} ${q.label(unit)} (${kindWord(stage)})`, entryId: row && row.id, at: Date.now() };
    lastSaved.set(id, n);
    saved.textContent = savedText(n, row, inView);
    const kind = instrument ? (instruments.find((i) => i.id === instrument) || {}).kind : 'none';
    store.setMeta(`instrumentKind:outlet:${quantity}`, kind).catch(() => {});
    if (instrument) store.setMeta(`instrument:${kind}`, instrument).catch(() => {});
  }

  const next = nextOutlet(ctx, o.system_id, id);
  const factText = rec.method === 'ak' ? `Ak ${fmt(rec.ak, 3)} ${u.area || ''}` : `× ${fmt(rec.factor || 1, 3)}`;

  return h('div', { 'data-test': 'outlet-screen', 'data-tag': o.tag },
    h('div', { class: 'screen-head' },
      h('h1', { 'data-test': 'outlet-tag' }, o.tag),
      h('p', { class: 'sub' }, [o.room, kindWord(o.kind), rec.size].filter(Boolean).join(' · ')),
      h('p', { class: 'sub' }, `Design ${fmt(o.design_flow)} ${u.air_flow || ''} · ${rec.method === 'ak' ? 'velocity × Ak' : 'hood'} ${factText}`)),
    h('div', { class: 'cols' },
      // "Next outlet" right under Save: on a phone the thumb moves on without scrolling past the result.
      h('div', {}, h('form', { class: 'card', on: { submit: onSave }, novalidate: true, 'data-test': 'reading-form' },
        entry.el,
        h('div', { class: 'form-grid' },
          h('div', { class: 'field' }, h('label', { for: 'stage' }, 'Stage'), stageSel),
          h('div', { class: 'field' }, h('label', { for: 'instrument' }, 'Instrument'), instrSel)),
        instrWarn,
        err,
        saveBtn,
        saved),
      h('div', { class: 'next-row' },
        link('All outlets', jobHash(ctx, 'system', o.system_id), { class: 'btn secondary' }),
        next
          ? link(`Next outlet: ${next.tag} ›`, jobHash(ctx, 'outlet', next.id), { class: 'btn', 'data-test': 'next-outlet', 'data-tag': next.tag })
          : h('span', { class: 'btn secondary', 'data-test': 'end-of-list', 'aria-disabled': 'true' }, 'Last outlet in this list'))),
      h('section', { class: 'card' },
        h('div', { class: 'row' }, h('h2', { class: 'grow' }, 'Result'), statusBadge(resultStatus)),
        result,
        (o.flags || []).length ? h('ul', { class: 'flags', 'data-test': 'outlet-flags' }, o.flags.map((f) => h('li', { 'data-kind': f.kind }, f.text))) : null,
        (o.errors || []).length ? h('ul', { class: 'flags' }, o.errors.map((e) => h('li', {}, e))) : null)),
    h('section', { class: 'card small' },
      h('dl', { class: 'facts' },
        h('dt', {}, 'System'), h('dd', {}, sys ? `${sys.tag} ${sys.name ? `· ${sys.name}` : ''}` : '—'),
        h('dt', {}, 'Room'), h('dd', {}, o.room || '—'),
        h('dt', {}, 'Kind'), h('dd', {}, kindWord(o.kind)),
        h('dt', {}, 'Size'), h('dd', {}, rec.size || '—'),
        h('dt', {}, 'Design flow'), h('dd', {}, `${fmt(o.design_flow)} ${u.air_flow || ''}`),
        h('dt', {}, rec.method === 'ak' ? 'Ak' : 'Factor'), h('dd', {}, factText)),
      ctx.role === 'lead' ? h('p', {}, link('Edit the design data', `${jobHash(ctx, 'lead')}?outlet=${encodeURIComponent(id)}`, { class: 'btn secondary' })) : null,
      caution('ladder')),
    !pending.length && !rejected.length ? null : message('info', 'Entries stay on this device until the server has them on disk.'));
}
