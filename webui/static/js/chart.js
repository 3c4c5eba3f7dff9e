// Psychrometric chart drawn as SVG. The curves come from the server
// (GET /jobs/{job}/chart, at the site pressure); this module only draws them.
import { api } from './api.js';
import { svg } from './ui.js';

// s builds an SVG element (ui.svg: attributes set as attributes, text as text nodes).
export const s = svg;

// The last answers, so the chart still draws when the server is out of reach.
const cache = new Map();

// chartRange picks a dry-bulb span around the two states, in whole steps.
export function chartRange(enter, leave, units) {
  const si = units === 'si';
  const step = si ? 5 : 10;
  const pad = si ? 5 : 10;
  const dbs = [enter, leave].filter((x) => x && Number.isFinite(x.dry_bulb)).map((x) => x.dry_bulb);
  if (!dbs.length) return si ? { low: 5, high: 40 } : { low: 40, high: 100 };
  let low = Math.floor((Math.min(...dbs) - pad) / step) * step;
  let high = Math.ceil((Math.max(...dbs) + pad) / step) * step;
  if (high - low < 3 * step) high = low + 3 * step;
  return { low, high };
}

// loadChart answers the chart for the range: from the server, else the last
// answer kept for this job (any range), else null.
export async function loadChart(jobId, low, high) {
  const key = `${jobId}|${low}|${high}`;
  if (cache.has(key)) return cache.get(key);
  try {
    const data = await api.get(`/jobs/${encodeURIComponent(jobId)}/chart?low=${low}&high=${high}`);
    cache.set(key, data);
    cache.set(`${jobId}|last`, data);
    return data;
  } catch (e) {
    return cache.get(`${jobId}|last`) || null;
  }
}

export function cachedChart(jobId, low, high) {
  return cache.get(`${jobId}|${low}|${high}`) || null;
}

// niceStep rounds a raw tick spacing to 1, 2 or 5 × 10^n.
function niceStep(raw) {
  const p = Math.pow(10, Math.floor(Math.log10(raw)));
  const m = raw / p;
  return (m <= 1 ? 1 : m <= 2 ? 2 : m <= 5 ? 5 : 10) * p;
}

// psychroChart returns the chart with the entering and leaving states
// ({dry_bulb, hum_ratio}, either may be null) and the process line between them.
export function psychroChart(chartData, enter, leave, units) {
  const W = 360, H = 250;
  const m = { l: 10, r: 50, t: 12, b: 34 };
  const pw = W - m.l - m.r, ph = H - m.t - m.b;
  const low = chartData.low, high = chartData.high;
  let wTop = chartData.w_max || 0.02;
  for (const st of [enter, leave]) if (st && st.hum_ratio > wTop * 0.95) wTop = st.hum_ratio * 1.08;
  const wStep = niceStep(wTop / 5);
  wTop = Math.ceil(wTop / wStep - 1e-9) * wStep;
  const x = (db) => m.l + ((db - low) / (high - low)) * pw;
  const y = (w) => m.t + ph - (w / wTop) * ph;
  const tUnit = chartData.temperature_unit || (units === 'si' ? '°C' : '°F');
  const wUnit = chartData.hum_ratio_unit || (units === 'si' ? 'kg/kg' : 'lb/lb');

  const clipId = `pc-clip-${Math.random().toString(36).slice(2, 9)}`;
  const svg = s('svg', {
    viewBox: `0 0 ${W} ${H}`, class: 'psychro', 'data-test': 'psychro-chart', role: 'img',
    'aria-label': 'Psychrometric chart of the coil process', preserveAspectRatio: 'xMidYMid meet',
  });
  svg.appendChild(s('title', {}, 'Psychrometric chart: dry bulb across, humidity ratio up the right side'));
  svg.appendChild(s('defs', {},
    s('clipPath', { id: clipId }, s('rect', { x: m.l, y: m.t, width: pw, height: ph })),
    s('marker', { id: `${clipId}-arrow`, viewBox: '0 0 10 10', refX: 9, refY: 5, markerWidth: 4.5, markerHeight: 4.5, orient: 'auto-start-reverse' },
      s('path', { d: 'M0,0 L10,5 L0,10 z', class: 'pc-arrow' }))));

  // Grid and axes: dry bulb along the bottom, humidity ratio on the right.
  const grid = s('g', { class: 'pc-grid' });
  const tStep = niceStep((high - low) / 6);
  for (let t = Math.ceil(low / tStep) * tStep; t <= high + 1e-9; t += tStep) {
    grid.appendChild(s('line', { x1: x(t), y1: m.t, x2: x(t), y2: m.t + ph }));
    grid.appendChild(s('text', { x: x(t), y: m.t + ph + 13, class: 'pc-tick', 'text-anchor': 'middle' }, String(Math.round(t * 10) / 10)));
  }
  const wDigits = Math.max(0, -Math.floor(Math.log10(wStep)));
  for (let w = 0; w <= wTop + 1e-12; w += wStep) {
    grid.appendChild(s('line', { x1: m.l, y1: y(w), x2: m.l + pw, y2: y(w) }));
    // No 0 on the right: it would sit on the last dry-bulb figure.
    if (w > wStep / 2) grid.appendChild(s('text', { x: m.l + pw + 4, y: y(w) + 3.5, class: 'pc-tick' }, w.toFixed(wDigits)));
  }
  grid.appendChild(s('text', { x: m.l + pw / 2, y: H - 4, class: 'pc-axis', 'text-anchor': 'middle' }, `dry bulb, ${tUnit}`));
  grid.appendChild(s('text', {
    x: W - 4, y: m.t + ph / 2, class: 'pc-axis', 'text-anchor': 'middle',
    transform: `rotate(-90 ${W - 4} ${m.t + ph / 2})`,
  }, `humidity ratio, ${wUnit}`));
  svg.appendChild(grid);
  svg.appendChild(s('rect', { x: m.l, y: m.t, width: pw, height: ph, class: 'pc-frame' }));

  // Boxes already taken (the states and their names, the axis titles), so
  // that a curve label that would overlap one is left out.
  const taken = [];
  const ok = (st) => st && Number.isFinite(st.dry_bulb) && Number.isFinite(st.hum_ratio);
  const stateMarks = [];
  for (const [st, name] of [[enter, 'entering'], [leave, 'leaving']]) {
    if (!ok(st)) continue;
    const cx = x(st.dry_bulb), cy = y(st.hum_ratio);
    const right = cx < m.l + pw * 0.6;
    const tx = right ? cx + 8 : cx - 8, ty = name === 'entering' ? cy - 8 : cy + 14;
    const w = name.length * 13 * 0.62;
    taken.push([cx - 7, cy - 7, 14, 14], [right ? tx : tx - w, ty - 11, w, 13]);
    stateMarks.push({ st, name, cx, cy, tx, ty, right });
  }
  taken.push([m.l + pw / 2 - 40, H - 15, 80, 13], [W - 16, m.t, 14, ph]);
  // place: true (and the box kept) when a label of width w, height h with
  // its top-left at (lx, ly) stays in the drawing and clear of the others.
  const place = (lx, ly, w, h) => {
    if (lx < 0 || ly < 0 || lx + w > W || ly + h > H) return false;
    for (const b of taken) if (lx < b[0] + b[2] + 1 && b[0] < lx + w + 1 && ly < b[1] + b[3] + 1 && b[1] < ly + h + 1) return false;
    taken.push([lx, ly, w, h]);
    return true;
  };
  const textW = (t, size) => t.length * size * 0.58;

  // Wet-bulb lines (dashed) and RH curves, clipped to the plot; a label
  // where each RH curve leaves it and where each wet-bulb line meets saturation.
  const curves = s('g', { 'clip-path': `url(#${clipId})` });
  const labels = s('g', { class: 'pc-labels' });
  const wbLabels = [];
  for (const l of chartData.wet_bulb_lines || []) {
    const pts = (l.points || []).filter((p) => Number.isFinite(p[0]) && Number.isFinite(p[1]));
    if (pts.length < 2) continue;
    curves.appendChild(s('polyline', {
      points: pts.map((p) => `${x(p[0]).toFixed(1)},${y(p[1]).toFixed(1)}`).join(' '),
      class: 'pc-wb', 'data-wb': l.wet_bulb, fill: 'none', stroke: '#8ea3b8', 'stroke-width': 0.8, 'stroke-dasharray': '4 3',
    }));
    if (pts[0][1] <= wTop * 0.97) wbLabels.push([l.wet_bulb, pts[0]]);
  }
  for (const c of chartData.curves || []) {
    const pts = (c.points || []).filter((p) => Number.isFinite(p[0]) && Number.isFinite(p[1]));
    if (pts.length < 2) continue;
    const sat = c.rel_hum >= 100;
    curves.appendChild(s('polyline', {
      points: pts.map((p) => `${x(p[0]).toFixed(1)},${y(p[1]).toFixed(1)}`).join(' '),
      class: sat ? 'pc-sat' : 'pc-rh', 'data-rh': c.rel_hum,
    }));
    if (sat) {
      // Saturation: labelled on the curve a third of the way across, above it.
      const p = pts[Math.floor(pts.length / 3)];
      const lx = x(p[0]) - 4, ly = y(p[1]) - 6;
      if (p[1] <= wTop && place(lx - textW('100 %', 11), ly - 10, textW('100 %', 11), 12)) {
        labels.appendChild(s('text', { x: lx, y: ly, class: 'pc-rhlabel pc-satlabel', 'text-anchor': 'end' }, '100 %'));
      }
      continue;
    }
    if (c.rel_hum % 20 !== 10 && c.rel_hum !== 50) continue;
    let last = null;
    for (const p of pts) if (p[1] <= wTop) last = p;
    // A curve leaving through the top runs close to saturation there: only 10 and 50 % keep a label.
    if (!last || (last[0] < high - 1e-9 && c.rel_hum !== 10 && c.rel_hum !== 50)) continue;
    const lx = Math.min(x(last[0]), m.l + pw - 2), ly = Math.max(y(last[1]), m.t + 12);
    const t = `${c.rel_hum} %`, w = textW(t, 11);
    if (place(lx - 2 - w, ly - 12, w, 12)) {
      labels.appendChild(s('text', { x: lx - 2, y: ly - 2, class: 'pc-rhlabel', 'text-anchor': 'end' }, t));
    }
  }
  for (const [wb, p] of wbLabels) {
    const t = String(Math.round(wb * 10) / 10), w = textW(t, 10);
    const lx = x(p[0]) - 3, ly = y(p[1]) - 3;
    if (lx - w >= m.l && place(lx - w, ly - 9, w, 10)) {
      labels.appendChild(s('text', { x: lx, y: ly, class: 'pc-wblabel', 'text-anchor': 'end', 'font-size': 10, fill: '#4a6a8a' }, t));
    }
  }
  svg.appendChild(curves);
  svg.appendChild(labels);

  // The process: entering → leaving.
  if (ok(enter) && ok(leave)) {
    // Stop the line short of the leaving circle so the arrowhead shows beside it.
    const x1 = x(enter.dry_bulb), y1 = y(enter.hum_ratio), x2 = x(leave.dry_bulb), y2 = y(leave.hum_ratio);
    const len = Math.hypot(x2 - x1, y2 - y1) || 1, cut = Math.min(7, len / 2);
    svg.appendChild(s('line', {
      x1, y1, x2: x2 - ((x2 - x1) / len) * cut, y2: y2 - ((y2 - y1) / len) * cut,
      class: 'pc-process', 'data-test': 'chart-process', 'marker-end': `url(#${clipId}-arrow)`,
    }));
  }
  for (const { st, name, cx, cy, tx, ty, right } of stateMarks) {
    svg.appendChild(s('circle', { cx, cy, r: 5, class: `pc-state pc-${name}`, 'data-test': 'chart-state', 'data-state': name },
      s('title', {}, `${name}: ${st.dry_bulb.toFixed(1)} ${tUnit}, ${st.hum_ratio.toFixed(4)} ${wUnit}`)));
    svg.appendChild(s('text', { x: tx, y: ty, class: 'pc-statelabel', 'text-anchor': right ? 'start' : 'end' }, name));
  }
  return svg;
}
