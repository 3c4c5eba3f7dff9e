// A record's form from field specs {k: JSON key ("design.airflow"), t: num |
// int | sel | date | area (text when absent), o: choices, u: unit or fn(values),
// l: label or fn, hint, show: fn(values), opt: left out when empty, zero: 0
// shown, int: a numeric choice}. Errors sit beside the field they name.

import { h, select, parseNumber } from './ui.js';
import { labelOf, errorText } from './labels.js';

const get = (o, k) => k.split('.').reduce((a, p) => (a == null ? a : a[p]), o);
function put(o, k, v) {
  const ps = k.split('.');
  const last = ps.pop();
  for (const p of ps) o = o[p] = { ...o[p] };
  if (v === undefined) delete o[last]; else o[last] = v;
}
const fn = (x, v) => (typeof x === 'function' ? x(v) : x);

export function form(kind, groups, rec) {
  const rows = [];
  const vals = () => Object.fromEntries(rows.map(([f, c]) => [f.k, c.value]));
  const row = (f) => {
    const v = get(rec, f.k);
    const num = f.t === 'num' || f.t === 'int';
    const at = { id: `e-${f.k}`, 'data-test': `f-${f.k}`, disabled: f.disabled || null };
    const c = f.t === 'sel' ? select(at, f.o, v == null ? f.o[0][0] : String(v))
      : h(f.t === 'area' ? 'textarea' : 'input', {
        ...at, type: f.t === 'date' ? 'date' : 'text', autocomplete: 'off', inputmode: num ? 'decimal' : null,
        value: v == null || (num && v === 0 && !f.zero) ? null : v, maxlength: f.t ? null : f.max || '200',
      });
    const lab = h('label', { for: at.id });
    const box = h('div', { class: f.t === 'area' || f.k === 'remarks' ? 'field wide' : 'field', 'data-field': f.k }, lab, c, f.hint ? h('div', { class: 'hint' }, f.hint) : null);
    rows.push([f, c, box, lab]);
    return box;
  };
  // A group of one field needs no title over its label.
  const el = h('div', {}, groups.map((g) => h('fieldset', { class: 'scr-group' }, g.fields.length > 1 ? h('legend', {}, g.title) : null,
    g.hint ? h('p', { class: 'hint' }, g.hint) : null, h('div', { class: 'form-grid' }, g.fields.map(row)))));
  // Show the fields the choices call for, with units that follow them.
  const refresh = () => {
    const v = vals();
    for (const [f, , box, lab] of rows) {
      box.hidden = !!f.show && !f.show(v);
      const u = fn(f.u, v);
      lab.textContent = (fn(f.l, v) || labelOf(kind, f.k)) + (u ? ` (${u})` : '');
    }
    for (const g of el.children) g.hidden = [...g.querySelectorAll('.field')].every((b) => b.hidden);
  };
  el.addEventListener('change', refresh);
  refresh();
  requestAnimationFrame(refresh); // after a re-render has put back what the user chose
  return {
    el,
    clear() {
      for (const m of el.querySelectorAll('[data-test=field-error]')) m.remove();
      for (const [, c] of rows) c.removeAttribute('aria-invalid');
    },
    // show(e): e beside the field it names; false when no such field is on show.
    show(e) {
      const r = rows.find(([f, , box]) => f.k === e.field && !box.hidden && !box.parentNode.closest('[hidden]'));
      if (!r) return false;
      r[1].setAttribute('aria-invalid', 'true');
      r[2].append(h('p', { class: 'msg msg-error', role: 'alert', 'data-test': 'field-error' }, errorText(kind, e, fn(r[0].l, vals()))));
      r[2].scrollIntoView({ block: 'center' });
      r[1].focus({ preventScroll: true });
      return true;
    },
    // read: the record with the form's values; throws {field, message} for a
    // field that is not a number. Hidden fields read as empty.
    read() {
      const out = structuredClone(rec);
      for (const [f, c, box] of rows) {
        if (f.k[0] === '_') continue;
        const s = box.hidden ? '' : c.value.trim();
        let v = s;
        if (f.t === 'num' || f.t === 'int' || f.int) {
          v = parseNumber(s);
          if (v === null && s) throw { field: f.k, message: 'is not a number; type digits, e.g. 1420 or 0.55' };
          if (f.t === 'int' && v !== null && !Number.isInteger(v)) throw { field: f.k, message: 'must be a whole number' };
          if (v === null) v = f.opt ? undefined : 0;
        } else if (f.opt && !s) v = undefined;
        put(out, f.k, v);
      }
      return out;
    },
  };
}
