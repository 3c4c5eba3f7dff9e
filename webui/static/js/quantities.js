// What may be read on each subject, and in which unit, as the server says at
// GET /quantities. The answer is kept in IndexedDB for offline use; a small
// built-in table (the dimensions only) covers a first start with no server.

import { api } from './api.js';
import { store } from './store.js';

// Fallback: quantity → dimension per subject kind, and the entry unit of each
// dimension in IP and SI (the server's table is the authority).
const FALLBACK_DIMS = {
  outlet: { flow: 'flow', velocity: 'velocity' },
  traverse: { vp: 'pressure', velocity: 'velocity', air_db: 'temperature', air_rh: 'percent', air_wb: 'temperature', static: 'pressure' },
  capacity_test: {
    flow: 'flow', enter_db: 'temperature', enter_wb: 'temperature', enter_rh: 'percent', enter_dp: 'temperature',
    leave_db: 'temperature', leave_wb: 'temperature', leave_rh: 'percent', leave_dp: 'temperature', outdoor_db: 'temperature',
  },
  water_test: { dp: 'water_pressure', flow: 'water_flow', enter_temp: 'temperature', leave_temp: 'temperature' },
  system: {
    fan_rpm: 'speed', motor_rpm: 'speed', volts: 'voltage', amps: 'current', static_supply: 'pressure', static_return: 'pressure',
    static_external: 'pressure', static_filter: 'pressure', static_coil: 'pressure', motor_sheave: 'length', fan_sheave: 'length',
    power_factor: 'ratio',
  },
};
const FALLBACK_UNITS = {
  flow: ['cfm', 'L/s'], water_flow: ['gpm', 'L/s'], velocity: ['fpm', 'm/s'], pressure: ['in_wg', 'Pa'],
  water_pressure: ['psi', 'kPa'], temperature: ['F', 'C'], percent: ['%', '%'], speed: ['rpm', 'rpm'],
  voltage: ['V', 'V'], current: ['A', 'A'], length: ['in', 'mm'], ratio: ['', ''],
};
const FALLBACK_LABELS = {
  cfm: 'cfm', 'L/s': 'L/s', 'm3/h': 'm³/h', gpm: 'gpm', fpm: 'fpm', 'm/s': 'm/s', in_wg: 'in. w.g.', Pa: 'Pa', kPa: 'kPa',
  psi: 'psi', ft: 'ft w.c.', m: 'm w.c.', bar: 'bar', F: '°F', C: '°C', '%': '%', rpm: 'rpm', V: 'V', A: 'A', in: 'in', mm: 'mm', '': '',
};

let table = null; // {quantities:[…], unit_labels:{…}}
let fetched = false; // the server's table came in this run
let asking = null;
let index = new Map();
const changeFns = new Set();

function setTable(t) {
  table = t;
  index = new Map((t.quantities || []).map((s) => [`${s.subject_kind}/${s.quantity}`, s]));
}

async function fetchTable() {
  try {
    const t = await api.get('/quantities', { timeout: 8000 });
    if (!t || !Array.isArray(t.quantities)) return;
    fetched = true;
    const changed = JSON.stringify(t) !== JSON.stringify(table);
    setTable(t);
    if (changed) {
      await store.setMeta('quantities', t);
      for (const fn of changeFns) fn();
    }
  } catch {
    // Offline: the kept table (or the fallback) covers it until the server answers.
  }
}

export const q = {
  // load: the cached table (quick, works offline); the server's is fetched
  // in the background and replaces it when it answers.
  async load() {
    const cached = await store.getMeta('quantities').catch(() => null);
    if (cached) setTable(cached);
    this.refresh();
  },

  async refresh() {
    if (!api.hasToken()) return; // asked again after joining
    if (!asking) asking = fetchTable().finally(() => { asking = null; });
    await asking;
  },

  // ensure: the server's table once a run; main asks whenever the server
  // answers, so a first try that failed is made good.
  ensure() { if (!fetched) this.refresh(); },

  onChange(fn) { changeFns.add(fn); },

  spec(subjectKind, quantity) {
    const s = index.get(`${subjectKind}/${quantity}`);
    if (s) return s;
    const dim = (FALLBACK_DIMS[subjectKind] || {})[quantity];
    if (!dim) return null;
    const [ip, si] = FALLBACK_UNITS[dim];
    return { subject_kind: subjectKind, quantity, dimension: dim, units: [...new Set([ip, si])], default_unit: { ip, si } };
  },

  // unitFor: the unit a reading is entered in on a job in units "ip" or "si".
  unitFor(subjectKind, quantity, jobUnits) {
    const s = this.spec(subjectKind, quantity);
    if (!s) return '';
    const u = jobUnits === 'si' ? 'si' : 'ip';
    if (s.default_unit && s.default_unit[u] !== undefined) return s.default_unit[u];
    return (s.units && s.units[0]) || '';
  },

  label(code) {
    const labels = (table && table.unit_labels) || FALLBACK_LABELS;
    if (code in labels) return labels[code];
    return FALLBACK_LABELS[code] ?? String(code ?? '');
  },

  // describe(kind, quantity): the server's plain description, e.g. "entering-air dry bulb".
  describe(subjectKind, quantity) {
    const s = index.get(`${subjectKind}/${quantity}`);
    return (s && s.description) || String(quantity).replace(/_/g, ' ');
  },
};
