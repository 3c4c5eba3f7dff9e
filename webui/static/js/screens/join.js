// Join: exchange the join code the lead shows (or the QR link's #join=CODE)
// for this device's token. The device name is remembered for next time.

import { h, button, message } from '../ui.js';

// "abcd-efgh", "ABCD EFGH" → "ABCDEFGH"
export function normalizeCode(code) {
  return String(code || '').replace(/[\s-]+/g, '').toUpperCase();
}

function showCode(code) {
  const c = normalizeCode(code);
  return c.length === 8 ? `${c.slice(0, 4)}-${c.slice(4)}` : c;
}

export function render(ctx) {
  const { api, store } = ctx;
  const dev = store.metaSync('device');
  const notice = ctx.notice();

  const codeIn = h('input', {
    id: 'join-code', 'data-test': 'join-code', autocomplete: 'off', autocapitalize: 'characters', spellcheck: 'false',
    class: 'num-input', placeholder: 'ABCD-EFGH', value: ctx.params.code ? showCode(ctx.params.code) : null,
    'aria-describedby': 'join-code-hint', autofocus: !ctx.params.code,
  });
  const nameIn = h('input', {
    id: 'device-name', 'data-test': 'device-name', autocomplete: 'name', maxlength: '60',
    value: store.metaSync('deviceName') || (dev && dev.name) || null, placeholder: 'e.g. Dana, phone 2',
    autofocus: !!ctx.params.code && !store.metaSync('deviceName'),
  });
  const err = h('p', { class: 'msg msg-error', role: 'alert', 'data-test': 'join-error', hidden: true });
  const submit = h('button', { type: 'submit', class: 'btn big', 'data-test': 'join-submit' }, 'Join');
  let waitTimer = null;

  function fail(text) {
    err.textContent = text;
    err.hidden = false;
  }

  // 429: say how long to wait and count it down; the button stays off meanwhile.
  function tooMany(seconds, text) {
    let left = seconds;
    submit.disabled = true;
    const tick = () => {
      if (!err.isConnected) { clearInterval(waitTimer); return; }
      if (left <= 0) {
        clearInterval(waitTimer);
        submit.disabled = false;
        fail('You can try again now.');
        return;
      }
      fail(`Too many tries: wait ${left} s, then try again. ${text}`);
      left--;
    };
    clearInterval(waitTimer);
    tick();
    waitTimer = setInterval(tick, 1000);
  }

  async function onSubmit(e) {
    e.preventDefault();
    err.hidden = true;
    const code = normalizeCode(codeIn.value);
    const name = nameIn.value.trim();
    if (code.length < 4) { fail('Enter the join code the lead shows you (8 letters and digits, e.g. ABCD-EFGH).'); codeIn.focus(); return; }
    if (!name) { fail('Give this device a name, e.g. your first name, so the lead knows whose readings are whose.'); nameIn.focus(); return; }
    submit.disabled = true;
    submit.textContent = 'Joining…';
    try {
      const res = await api.post('/pair', { code, name }, { noToken: true });
      await store.setMeta('token', res.token);
      await store.setMeta('device', res.device);
      await store.setMeta('deviceName', name);
      api.setToken(res.token);
      ctx.q.refresh();
      ctx.go('#/');
    } catch (ex) {
      submit.disabled = false;
      submit.textContent = 'Join';
      if (ex.status === 429) tooMany(ex.retryAfter || 60, '');
      else if (ex.status === 0) fail('The server cannot be reached. Check that this device is on the site Wi-Fi and that the address is the one the lead gave.');
      else if (ex.status === 401 || ex.field === 'code') fail(`Wrong or expired code: ${ex.message}`);
      else fail(ex.message);
    }
  }

  const joined = dev && api.hasToken();
  return h('form', { class: 'join', 'data-test': 'join-screen', on: { submit: onSubmit }, novalidate: true },
    h('div', { class: 'screen-head' }, h('h1', {}, 'Join the job'),
      h('p', { class: 'sub' }, 'Enter the code the lead shows, or scan the lead\'s QR code.')),
    notice ? message('error', notice) : null,
    joined ? message('info', `This device is joined as “${dev.name}” (${dev.role}). Joining again replaces that.`) : null,
    h('section', { class: 'card' },
      h('div', { class: 'field' },
        h('label', { for: 'join-code' }, 'Join code'), codeIn,
        h('div', { class: 'hint', id: 'join-code-hint' }, 'Letters and digits; the dash and spaces do not matter.')),
      h('div', { class: 'field' },
        h('label', { for: 'device-name' }, 'Your name on this device'), nameIn,
        h('div', { class: 'hint' }, 'Shown on every reading you enter.')),
      err,
      submit,
      joined ? h('p', {}, button('Back to the job', { class: 'btn secondary' }, () => ctx.go('#/'))) : null));
}
