// The closeout report: issued revisions for all; a lead previews the next,
// draws a signature and signs (the server renders and signs the PDF).

import { h, button, field, message, fill, dateTimeText } from '../ui.js';
import { enc } from '../api.js';

// Kept across re-renders: the drawn signature, the preview, the answer.
let state = null;

function stateFor(jobId) {
  if (!state || state.jobId !== jobId) {
    if (state && state.previewURL) URL.revokeObjectURL(state.previewURL);
    state = {
      jobId, pad: null, list: null, listAt: 0, listError: '', previewURL: '', previewName: '',
      busy: '', confirming: false, signed: null, error: '', errorField: '',
    };
  }
  return state;
}


function makePad() {
  const canvas = h('canvas', {
    class: 'scr-sigpad', width: '900', height: '300', 'data-test': 'signature-pad',
    role: 'img', 'aria-label': 'Signature pad: draw your signature with a finger or a stylus',
  });
  const pad = { canvas, ink: false, onInk: null };
  const g = canvas.getContext('2d');
  g.lineWidth = 4;
  g.lineCap = 'round';
  g.lineJoin = 'round';
  g.strokeStyle = '#10205a';
  let drawing = null;
  const at = (e) => {
    const r = canvas.getBoundingClientRect();
    return [(e.clientX - r.left) * (canvas.width / r.width), (e.clientY - r.top) * (canvas.height / r.height)];
  };
  canvas.addEventListener('pointerdown', (e) => {
    e.preventDefault();
    try { canvas.setPointerCapture(e.pointerId); } catch { /* a synthetic event */ }
    drawing = e.pointerId;
    const [x, y] = at(e);
    g.beginPath();
    g.moveTo(x, y);
    g.lineTo(x + 0.1, y + 0.1); // a tap leaves a dot
    g.stroke();
  });
  canvas.addEventListener('pointermove', (e) => {
    if (drawing !== e.pointerId) return;
    e.preventDefault();
    const [x, y] = at(e);
    g.lineTo(x, y);
    g.stroke();
    if (!pad.ink) { pad.ink = true; if (pad.onInk) pad.onInk(); }
  });
  const end = (e) => {
    if (drawing !== e.pointerId) return;
    drawing = null;
    if (!pad.ink) { pad.ink = true; if (pad.onInk) pad.onInk(); }
  };
  canvas.addEventListener('pointerup', end);
  canvas.addEventListener('pointercancel', end);
  pad.clear = () => { g.clearRect(0, 0, canvas.width, canvas.height); pad.ink = false; };
  return pad;
}


async function fetchPDF(ctx, path) {
  const token = ctx.store.metaSync('token');
  let res;
  try {
    res = await fetch(ctx.api.base + path, { headers: { Authorization: `Bearer ${token}` }, cache: 'no-store' });
  } catch {
    throw new Error('The server cannot be reached. Reports need the site Wi-Fi.');
  }
  if (!res.ok) {
    let msg = `The server answered ${res.status}.`;
    try { msg = (await res.json()).error || msg; } catch { /* not JSON */ }
    throw new Error(msg);
  }
  const name = /filename\*?=(?:UTF-8'')?"?([^";]+)"?/i.exec(res.headers.get('Content-Disposition') || '');
  let file = 'report.pdf';
  if (name) { try { file = decodeURIComponent(name[1]); } catch { file = name[1]; } }
  return { blob: await res.blob(), file };
}

// save: a blob as a download (CSP keeps blob: out of frames, not links).
function save(url, file) {
  const a = h('a', { href: url, download: file, hidden: true });
  document.body.appendChild(a);
  a.click();
  a.remove();
}

async function download(ctx, revision, btn, out) {
  btn.disabled = true;
  fill(out);
  try {
    const { blob, file } = await fetchPDF(ctx, `/jobs/${enc(ctx.jobId)}/reports/${revision}.pdf`);
    const url = URL.createObjectURL(blob);
    save(url, file);
    setTimeout(() => URL.revokeObjectURL(url), 60000);
  } catch (e) {
    fill(out, message('error', `Not downloaded: ${e.message}`));
  } finally {
    btn.disabled = false;
  }
}


async function loadList(ctx, st, force) {
  if (!force && st.list && Date.now() - st.listAt < 10000) return;
  try {
    st.list = await ctx.api.get(`/jobs/${enc(ctx.jobId)}/reports`);
    st.listAt = Date.now();
    st.listError = '';
  } catch (e) {
    st.listError = e.message;
  }
}

function issuedCard(ctx, st) {
  const out = h('div', { 'aria-live': 'polite' });
  const reports = (st.list && st.list.reports) || [];
  return h('section', { class: 'card', 'data-test': 'report-list' },
    h('h2', {}, 'Issued revisions'),
    st.listError ? message('error', `The list could not be loaded: ${st.listError}`) : null,
    !st.listError && !reports.length ? h('p', { class: 'muted' }, 'No revision has been signed yet.') : null,
    reports.length ? h('ul', { class: 'list' }, reports.slice().reverse().map((r) => {
      const btn = button('Download PDF', { class: 'btn secondary', 'data-test': 'report-download', 'data-revision': String(r.revision) },
        () => download(ctx, r.revision, btn, out));
      return h('li', { class: 'row scr-report-row', 'data-test': 'report-revision', 'data-revision': String(r.revision) },
        h('div', { class: 'grow' },
          h('strong', {}, `Revision ${r.revision}`),
          h('div', { class: 'small' }, `Signed by ${r.signer}, ${dateTimeText(r.issued_at)} · ${Math.max(1, Math.round(r.size / 1024))} KB`)),
        btn);
    })) : null,
    out);
}


function signCard(ctx, st) {
  const next = st.list ? st.list.next_revision : null;
  const revText = next ? `revision ${next}` : 'the next revision';
  const input = (test, attrs) => h('input', { type: 'text', autocomplete: 'off', 'data-test': test, ...attrs });
  const name = input('signoff-name', { autocomplete: 'name' });
  const cert = input('signoff-cert');
  const org = input('signoff-org', { autocomplete: 'organization' });
  if (!st.pad) st.pad = makePad();
  const pad = st.pad;
  const msgBox = h('div', { 'aria-live': 'polite' });
  const problem = (text, focus) => { st.error = text; fill(msgBox, message('error', text)); if (focus) focus.focus(); };
  if (st.error) fill(msgBox, message('error', st.error));
  name.addEventListener('input', () => { if (st.error.startsWith('Enter your name')) { st.error = ''; fill(msgBox); } });

  const clearBtn = button('Clear', { class: 'btn secondary', 'data-test': 'signature-clear' }, () => { pad.clear(); paintPad(); });
  const padNote = h('p', { class: 'small muted' });
  const paintPad = () => { padNote.textContent = pad.ink ? 'Signature drawn.' : 'Draw your signature in the box above.'; };
  pad.onInk = () => { paintPad(); if (st.error.startsWith('Draw your')) { st.error = ''; fill(msgBox); } };
  paintPad();

  const previewOut = h('div', { 'aria-live': 'polite' });
  const paintPreview = () => {
    fill(previewOut, st.previewURL
      ? h('p', {}, h('a', { class: 'btn secondary', href: st.previewURL, download: st.previewName, 'data-test': 'report-preview-link' }, 'Save the preview again'))
      : null);
  };
  paintPreview();
  const previewBtn = button(`Preview ${revText} (unsigned PDF)`, { class: 'btn secondary', 'data-test': 'report-preview', disabled: st.busy ? true : null }, async () => {
    st.busy = 'preview';
    previewBtn.disabled = true;
    previewBtn.textContent = 'Making the preview…';
    fill(msgBox);
    st.error = '';
    try {
      const { blob, file } = await fetchPDF(ctx, `/jobs/${enc(ctx.jobId)}/report/preview.pdf`);
      if (st.previewURL) URL.revokeObjectURL(st.previewURL);
      st.previewURL = URL.createObjectURL(blob);
      st.previewName = file;
      save(st.previewURL, file);
      paintPreview();
    } catch (e) {
      problem(`No preview: ${e.message}`);
    } finally {
      st.busy = '';
      previewBtn.disabled = false;
      previewBtn.textContent = `Preview ${revText} (unsigned PDF)`;
    }
  });

  const confirmBox = h('div', { 'data-test': 'report-confirm' });
  const paintConfirm = () => {
    if (!st.confirming) { fill(confirmBox); return; }
    const yes = button(st.busy === 'sign' ? 'Signing…' : `Yes, sign ${revText}`, { class: 'btn big', 'data-test': 'report-sign-confirm', disabled: st.busy ? true : null }, () => doSign(yes));
    fill(confirmBox, h('div', { class: 'card scr-confirm', role: 'alertdialog', 'aria-label': 'Confirm signing' },
      h('p', {}, `Sign and issue ${revText} as ${name.value.trim()}? A signed revision cannot be changed. Readings taken after this go into the next revision.`),
      h('div', { class: 'actions' }, yes,
        button('Cancel', { class: 'btn secondary', 'data-test': 'report-sign-cancel', disabled: st.busy ? true : null }, () => { st.confirming = false; paintConfirm(); }))));
  };

  const signBtn = button(`Sign ${revText}`, { class: 'btn big', 'data-test': 'report-sign', disabled: st.busy ? true : null }, () => {
    fill(msgBox);
    st.error = '';
    if (!name.value.trim()) return problem('Enter your name: it goes on the sign-off page.', name);
    if (!pad.ink) return problem('Draw your signature in the box first.');
    st.confirming = true;
    paintConfirm();
  });

  async function doSign(yes) {
    st.busy = 'sign';
    yes.disabled = true;
    yes.textContent = 'Signing…';
    signBtn.disabled = true;
    const png = pad.canvas.toDataURL('image/png').replace(/^data:image\/png;base64,/, '');
    try {
      st.signed = await ctx.api.post(`/jobs/${enc(ctx.jobId)}/report/sign`, {
        name: name.value.trim(), certification: cert.value.trim(), organisation: org.value.trim(), signature_png: png,
      }, { timeout: 120000 });
      st.confirming = false;
      pad.clear();
      st.busy = '';
      st.error = '';
      if (st.previewURL) URL.revokeObjectURL(st.previewURL);
      st.previewURL = '';
      await loadList(ctx, st, true);
    } catch (e) {
      st.busy = '';
      st.confirming = false;
      const hint = e.field === 'revision' ? ' Someone else signed meanwhile; check the list and sign again.' : '';
      st.error = `Not signed: ${e.message}${hint}`;
    }
    ctx.rerender();
  }
  paintConfirm();

  const done = st.signed ? h('div', { class: 'msg msg-ok', role: 'status', 'data-test': 'report-signed' },
    h('p', {}, `Revision ${st.signed.revision} is signed and stored (signed by ${st.signed.signer}). Download it from the list below.`)) : null;

  return h('section', { class: 'card', 'data-test': 'report-signoff' },
    h('h2', {}, `Sign ${revText}`),
    h('p', { class: 'small muted' }, 'The server makes the PDF from the data it holds now and signs it. Preview it first and check the figures.'),
    done,
    field('Your name', name),
    field('Certification or license number', cert),
    field('Firm', org, 'Leave empty to use the firm named on the signer certificate.'),
    h('div', { class: 'field' }, h('div', { class: 'label' }, 'Signature'), pad.canvas, padNote,
      h('div', { class: 'actions' }, clearBtn)),
    h('div', { class: 'actions' }, previewBtn),
    previewOut,
    msgBox,
    h('div', { class: 'actions' }, signBtn),
    confirmBox);
}

export async function render(ctx) {
  const st = stateFor(ctx.jobId);
  await loadList(ctx, st, false);
  const job = ctx.view && ctx.view.job;
  return h('div', { 'data-test': 'signoff-screen' },
    h('div', { class: 'screen-head' },
      h('h1', {}, 'Closeout report'),
      job ? h('p', { class: 'sub' }, job.name) : null),
    ctx.role === 'lead' ? signCard(ctx, st) : null,
    issuedCard(ctx, st));
}
