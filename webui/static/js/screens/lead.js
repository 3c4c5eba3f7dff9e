// Lead's tools: join codes (text and QR), devices with revoke, and the CSV
// schedule import with its preview. Design records are edited in Set up.
// The server checks the role too; this screen only hides what a technician
// may not do.

import { h, fmt, button, select, field, message, clear, kindWord, dateTimeText, timeText, link, jobHash } from '../ui.js';
import { enc } from '../api.js';

// Kept across re-renders (a sync update every few seconds must not wipe a
// code just shown or a preview just made).
let lastCode = null;          // {code, role, expires_at, join_url, qr_png}
let devices = { at: 0, list: null, error: '' };
let preview = null;           // {kind, text, problems, report}
let draft = { kind: 'outlets', text: '' }; // the import text as typed

function joinCodeCard(ctx) {
  const roleSel = select({ id: 'join-role', 'data-test': 'join-role' }, [['technician', 'Technician (crew)'], ['lead', 'Lead']], 'technician');
  const out = h('div', { 'data-test': 'join-code-box', 'aria-live': 'polite' });
  const paint = () => {
    clear(out);
    if (!lastCode) return;
    const code = lastCode.code || '';
    const link = lastCode.join_url;
    // Append ignores no null: a missing QR code must not print "null".
    out.append(...[
      h('p', { class: 'codebox', 'data-test': 'join-code-text' }, code),
      h('p', {}, `${kindWord(lastCode.role || '')} code, valid until ${timeText(lastCode.expires_at)}.` +
        (link ? ' Scan the QR code or open:' : ' There is no join link to scan:')),
      h('p', { class: link ? 'small' : 'msg msg-error', 'data-test': 'join-url' }, link || lastCode.join_url_note || ''),
      link && lastCode.qr_png ? h('img', {
        class: 'qr', 'data-test': 'join-qr', alt: `QR code of the join address for code ${code}`,
        src: `data:image/png;base64,${lastCode.qr_png}`, width: '220', height: '220',
      }) : null].filter(Boolean));
  };
  const err = h('p', { class: 'msg msg-error', role: 'alert', hidden: true });
  const btn = button('New join code', { 'data-test': 'new-join-code' }, async () => {
    err.hidden = true;
    btn.disabled = true;
    try {
      const res = await ctx.api.post('/join-codes', { role: roleSel.value });
      lastCode = { role: roleSel.value, ...res };
      paint();
    } catch (e) {
      err.textContent = `No code: ${e.message}`;
      err.hidden = false;
    } finally {
      btn.disabled = false;
    }
  });
  paint();
  return h('section', { class: 'card' },
    h('h2', {}, 'Join a device'),
    h('p', { class: 'small muted' }, 'A code is short-lived. A lead code joins one device; a crew code joins any number until it expires.'),
    h('div', { class: 'row' }, h('div', { class: 'grow' }, field('Role', roleSel)), btn),
    err, out);
}

async function loadDevices(ctx, force) {
  if (!force && devices.list && Date.now() - devices.at < 15000) return;
  try {
    const res = await ctx.api.get('/devices');
    devices = { at: Date.now(), list: res.devices || [], error: '' };
  } catch (e) {
    devices = { at: Date.now(), list: devices.list, error: e.message };
  }
}

function devicesCard(ctx) {
  const me = ctx.device && ctx.device.id;
  const list = [...(devices.list || [])].sort((a, b) => (a.revoked_at ? 1 : 0) - (b.revoked_at ? 1 : 0) || a.name.localeCompare(b.name));
  const box = h('section', { class: 'card' }, h('h2', {}, 'Devices'),
    devices.error ? message('error', `Could not list devices: ${devices.error}`) : null);
  if (!list.length) { box.append(h('p', {}, devices.list ? 'No devices.' : 'Loading…')); return box; }
  box.append(h('ul', { class: 'list' }, list.map((d) => {
    const revoked = !!d.revoked_at;
    const err = h('p', { class: 'msg msg-error', role: 'alert', hidden: true });
    const revoke = revoked || d.id === me ? null : button('Revoke', { class: 'btn danger', 'data-test': 'device-revoke' }, async () => {
      // A second tap confirms: a revoked device is cut off until it joins again.
      if (!revoke.dataset.armed) {
        revoke.dataset.armed = '1';
        revoke.textContent = `Tap again to revoke ${d.name}`;
        setTimeout(() => { delete revoke.dataset.armed; revoke.textContent = 'Revoke'; }, 5000);
        return;
      }
      try {
        await ctx.api.post(`/devices/${enc(d.id)}/revoke`, {});
        await loadDevices(ctx, true);
        ctx.rerender();
      } catch (e) {
        err.textContent = e.message;
        err.hidden = false;
      }
    });
    return h('li', { class: 'item', 'data-test': 'device', 'data-name': d.name, 'data-revoked': String(revoked) },
      h('span', { class: 'tag' }, d.name),
      h('span', { class: 'room' }, `${d.role}${d.id === me ? ' · this device' : ''} · ${revoked ? `revoked ${dateTimeText(d.revoked_at)}` : `last seen ${d.last_seen ? dateTimeText(d.last_seen) : 'never'}`}`),
      revoke, err);
  })));
  return box;
}

function importCard(ctx) {
  const kindSel = select({ id: 'import-kind', 'data-test': 'import-kind' },
    [['outlets', 'Outlet schedule'], ['equipment', 'Equipment schedule']], draft.kind);
  const text = h('textarea', { id: 'import-csv', 'data-test': 'import-csv', spellcheck: 'false', wrap: 'off', placeholder: 'Paste the CSV here, or choose a file', value: draft.text || null });
  const file = h('input', { type: 'file', accept: '.csv,text/csv', 'data-test': 'import-file', id: 'import-file' });
  const problems = h('ul', { class: 'problems', 'data-test': 'import-problems' });
  const summary = h('p', { 'data-test': 'import-summary', 'aria-live': 'polite' });
  const previewBtn = button('Check the file', { 'data-test': 'import-preview', class: 'btn secondary' }, () => run(true));
  const commitBtn = button('Import', { 'data-test': 'import-commit' }, () => run(false));

  // The import button is on only while the checked text is unchanged and clean.
  const paint = () => {
    draft = { kind: kindSel.value, text: text.value };
    clear(problems);
    summary.textContent = '';
    const clean = preview && preview.text === text.value && preview.kind === kindSel.value && !preview.problems.length && !preview.error;
    commitBtn.disabled = !clean || !text.value.trim();
    if (!preview) return;
    if (preview.error) { summary.textContent = preview.error; summary.className = 'msg msg-error'; return; }
    summary.className = preview.problems.length ? 'msg msg-error' : 'msg msg-ok';
    const rep = preview.report || {};
    const counts = `${rep.created || 0} new, ${rep.updated || 0} changed, ${rep.unchanged || 0} unchanged`;
    if (preview.done) summary.textContent = `Imported: ${counts}.`;
    else if (preview.problems.length) summary.textContent = `${preview.problems.length} problem(s); fix the file and check again. Nothing is imported while any line is wrong.`;
    else summary.textContent = preview.text === text.value ? `No problems: ${counts}. Press Import to store it.` : 'The text changed: check it again.';
    for (const p of preview.problems) {
      problems.append(h('li', { 'data-line': String(p.line), 'data-column': p.column || '' },
        `line ${p.line}${p.column ? `, column ${p.column}` : ''}: ${p.message}`));
    }
  };

  async function run(dry) {
    const body = text.value;
    const kind = kindSel.value;
    if (!body.trim()) { preview = { kind, text: body, problems: [], error: 'Paste or choose a CSV file first.' }; paint(); return; }
    previewBtn.disabled = true;
    commitBtn.disabled = true;
    try {
      const rep = await ctx.api.post(`/jobs/${enc(ctx.jobId)}/import/${kind}${dry ? '?dry_run=1' : ''}`, body, { contentType: 'text/csv' });
      preview = { kind, text: body, problems: rep.problems || [], report: rep, done: !dry };
      if (!dry) ctx.sync.refresh().catch(() => {});
    } catch (e) {
      const rep = e.data && e.data.problems ? e.data : null;
      preview = rep ? { kind, text: body, problems: rep.problems, report: rep } : { kind, text: body, problems: [], error: e.message };
    } finally {
      previewBtn.disabled = false;
    }
    paint();
  }

  text.addEventListener('input', paint);
  kindSel.addEventListener('change', paint);
  file.addEventListener('change', async () => {
    const f = file.files && file.files[0];
    if (!f) return;
    text.value = await f.text();
    text.dataset.dirty = '1';
    paint();
  });
  paint();

  return h('section', { class: 'card' },
    h('h2', {}, 'Import a design schedule (CSV)'),
    h('p', { class: 'small muted' }, 'Check the file first: problems are listed by line and column, and nothing is imported while any line is wrong.'),
    field('What the file holds', kindSel),
    field('File', file),
    h('div', { class: 'field' }, h('label', { for: 'import-csv' }, 'CSV text'), text),
    h('div', { class: 'actions' }, previewBtn, commitBtn),
    summary, problems);
}

export async function render(ctx) {
  if (ctx.role !== 'lead') {
    return h('section', { class: 'card', 'data-test': 'lead-denied' },
      h('h2', {}, 'For the lead\'s device'),
      h('p', {}, 'Join codes, devices and design data are managed from the lead\'s device.'));
  }
  await loadDevices(ctx, false);
  return h('div', { 'data-test': 'lead-screen' },
    h('div', { class: 'screen-head' }, h('h1', {}, 'Lead'), h('p', { class: 'sub' }, ctx.view.job.name)),
    h('div', { class: 'cols' },
      h('div', {}, joinCodeCard(ctx), devicesCard(ctx)),
      h('div', {}, importCard(ctx), h('p', {}, link('Set up the job: systems, outlets, tests', jobHash(ctx, 'setup'), { class: 'btn secondary', 'data-test': 'open-setup' })))),
    h('p', { class: 'small muted' }, `Units: ${ctx.units === 'si' ? 'SI' : 'IP'}; design flows in ${(ctx.view.results.units || {}).air_flow || ''}. ${fmt(ctx.view.snapshot.outlets.length, 0)} outlets on this job.`));
}
