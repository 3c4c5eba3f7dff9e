#!/usr/bin/env node
// Prints testdata/psychrolib_states.json on standard output: moist-air states and
// coil capacities computed by the pinned psychrolib package (package.json), the
// reference that the Go tests in measure/ compare against. Regenerate with
//   cd testdata/psychrolib && npm ci && node gen.js > ../psychrolib_states.json
// The output is deterministic (fixed case order, fixed key order, 12 significant
// digits), so a re-run reproduces the committed file byte for byte; test.sh checks.
//
// Values are written in fieldtab's units, not psychrolib's: SI pressure in kPa
// (psychrolib: Pa) and SI enthalpy in kJ/kg (psychrolib: J/kg). Relative humidity
// is in percent (psychrolib: 0–1).
'use strict';

const psy = require('psychrolib');
const libVersion = require('psychrolib/package.json').version;

function num(x) {
  if (!Number.isFinite(x)) throw new Error('non-finite value ' + x);
  return Number(x.toPrecision(12));
}

const systems = {
  ip: {
    lib: psy.IP,
    pScale: 1, // psia
    hScale: 1, // Btu/lb
    elevations: [0, 1000, 5000, 10000], // ft
    dryBulbs: [0, 20, 28, 35, 45, 60, 75, 85, 100, 120], // °F
    belowFreezing: 32,
    relHums: [15, 50, 90, 100], // %
    wetDepressions: [1, 8], // °F below dry bulb (dry bulb >= 32 °F)
    wetDepressionsIce: [0.5, 2], // °F below dry bulb (dry bulb < 32 °F)
    dewDepressions: [5, 25], // °F below dry bulb
    humRatios: [0.0008, 0.006, 0.016], // lb/lb, where below saturation
  },
  si: {
    lib: psy.SI,
    pScale: 1e-3, // Pa -> kPa
    hScale: 1e-3, // J/kg -> kJ/kg
    elevations: [0, 300, 1500, 3000], // m
    dryBulbs: [-18, -7, -2, 2, 7, 15, 24, 29, 38, 49], // °C
    belowFreezing: 0,
    relHums: [15, 50, 90, 100],
    wetDepressions: [0.5, 4.5],
    wetDepressionsIce: [0.3, 1.1],
    dewDepressions: [3, 14],
    humRatios: [0.0008, 0.006, 0.016],
  },
};

// Every property of a state, recomputed by psychrolib from its humidity ratio so
// that the property given as input is also checked (within the solver tolerance).
function stateRecord(sys, units, elevation, p, dryBulb, input, humidity) {
  let w;
  switch (input) {
    case 'rel_hum':
      w = psy.GetHumRatioFromRelHum(dryBulb, humidity / 100, p);
      break;
    case 'wet_bulb':
      w = psy.GetHumRatioFromTWetBulb(dryBulb, humidity, p);
      break;
    case 'dew_point':
      w = psy.GetHumRatioFromTDewPoint(humidity, p);
      break;
    case 'hum_ratio':
      w = humidity;
      break;
    default:
      throw new Error('input ' + input);
  }
  if (!(w > 1e-6)) throw new Error('humidity ratio too small for a fixture case: ' + [units, dryBulb, input, humidity]);
  return {
    units: units,
    elevation: elevation,
    pressure: num(p * sys.pScale),
    dry_bulb: dryBulb,
    input: input,
    humidity: humidity,
    wet_bulb: num(psy.GetTWetBulbFromHumRatio(dryBulb, w, p)),
    dew_point: num(psy.GetTDewPointFromHumRatio(dryBulb, w, p)),
    rel_hum: num(100 * psy.GetRelHumFromHumRatio(dryBulb, w, p)),
    hum_ratio: num(w),
    enthalpy: num(psy.GetMoistAirEnthalpy(dryBulb, w) * sys.hScale),
    spec_volume: num(psy.GetMoistAirVolume(dryBulb, w, p)),
    density: num(psy.GetMoistAirDensity(dryBulb, w, p)),
    vap_pres: num(psy.GetVapPresFromHumRatio(w, p) * sys.pScale),
  };
}

function round6(x) {
  return Number(x.toFixed(6));
}

const states = [];
for (const units of ['ip', 'si']) {
  const sys = systems[units];
  psy.SetUnitSystem(sys.lib);
  for (const elevation of sys.elevations) {
    const p = psy.GetStandardAtmPressure(elevation);
    for (const t of sys.dryBulbs) {
      for (const rh of sys.relHums) {
        states.push(stateRecord(sys, units, elevation, p, t, 'rel_hum', rh));
      }
      const deps = t < sys.belowFreezing ? sys.wetDepressionsIce : sys.wetDepressions;
      for (const d of deps) {
        states.push(stateRecord(sys, units, elevation, p, t, 'wet_bulb', round6(t - d)));
      }
      for (const d of sys.dewDepressions) {
        states.push(stateRecord(sys, units, elevation, p, t, 'dew_point', round6(t - d)));
      }
      for (const w of sys.humRatios) {
        if (w < psy.GetSatHumRatio(t, p)) {
          states.push(stateRecord(sys, units, elevation, p, t, 'hum_ratio', w));
        }
      }
    }
  }
}

// Edge cases at sea level: dry bulbs on either side of the triple point, and
// humidity ratios in the band where the ice-film (eq. 35) and water-film (eq. 33)
// psychrometric equations both have a wet-bulb root; PsychroLib's bisection picks
// one of them, sometimes above and sometimes below freezing.
const edges = {
  ip: [
    [32, 'rel_hum', 50], [32, 'rel_hum', 100], [32.018, 'rel_hum', 50], [32.018, 'rel_hum', 100],
    [32.02, 'rel_hum', 50], [32.02, 'rel_hum', 100],
    [36, 'hum_ratio', 0.00289], [36, 'hum_ratio', 0.00293], [36, 'hum_ratio', 0.00297],
    [40, 'hum_ratio', 0.00201], [40, 'hum_ratio', 0.00209], [40, 'hum_ratio', 0.00217],
  ],
  si: [
    [0, 'rel_hum', 50], [0, 'rel_hum', 100], [0.01, 'rel_hum', 50], [0.01, 'rel_hum', 100],
    [0.02, 'rel_hum', 50], [0.02, 'rel_hum', 100],
    [3, 'hum_ratio', 0.002576], [3, 'hum_ratio', 0.002632], [3, 'hum_ratio', 0.002688],
    [5, 'hum_ratio', 0.00178], [5, 'hum_ratio', 0.00187], [5, 'hum_ratio', 0.00197],
  ],
};
for (const units of ['ip', 'si']) {
  const sys = systems[units];
  psy.SetUnitSystem(sys.lib);
  const p = psy.GetStandardAtmPressure(0);
  for (const [t, input, humidity] of edges[units]) {
    states.push(stateRecord(sys, units, 0, p, t, input, humidity));
  }
}

// Coil capacity: dry-air mass flow × enthalpy change, worked here with
// psychrolib's humidity ratio, enthalpy and specific volume so the Go CoilCapacity
// is checked against arithmetic it did not do itself. Flow is cfm (IP) or L/s (SI);
// mass flow is lb/h (IP) or kg/s (SI); capacity Btu/h (IP) or kW (SI).
const capacityCases = [
  // units, elevation, flow, basis, entering [dry bulb, wet bulb], leaving [dry bulb, wet bulb]
  ['ip', 0, 2000, 'standard', [80, 67], [55, 54]],
  ['ip', 0, 2000, 'enter', [80, 67], [55, 54]],
  ['ip', 0, 2000, 'leave', [80, 67], [55, 54]],
  ['ip', 5000, 2000, 'enter', [80, 67], [55, 54]],
  ['ip', 1000, 12000, 'enter', [78, 65], [57, 56]],
  ['ip', 0, 1500, 'enter', [60, 50], [95, 63.5]], // heating
  ['ip', 10000, 800, 'leave', [45, 40], [110, 66]], // heating
  ['si', 0, 1000, 'standard', [27, 19.5], [13, 12.2]],
  ['si', 0, 1000, 'enter', [27, 19.5], [13, 12.2]],
  ['si', 1500, 1000, 'enter', [27, 19.5], [13, 12.2]],
  ['si', 300, 4500, 'leave', [26, 18], [14, 13.2]],
  ['si', 0, 700, 'enter', [15, 10], [35, 17.5]], // heating
  ['si', 3000, 400, 'leave', [7, 4], [43, 19]], // heating
];

const capacities = [];
for (const [units, elevation, flow, basis, enter, leave] of capacityCases) {
  const sys = systems[units];
  psy.SetUnitSystem(sys.lib);
  const p = psy.GetStandardAtmPressure(elevation);
  const we = psy.GetHumRatioFromTWetBulb(enter[0], enter[1], p);
  const wl = psy.GetHumRatioFromTWetBulb(leave[0], leave[1], p);
  const he = psy.GetMoistAirEnthalpy(enter[0], we) * sys.hScale;
  const hl = psy.GetMoistAirEnthalpy(leave[0], wl) * sys.hScale;
  const hel = psy.GetMoistAirEnthalpy(enter[0], wl) * sys.hScale;
  let m;
  if (units === 'ip') {
    const perVolume = { standard: 0.075, enter: 1 / psy.GetMoistAirVolume(enter[0], we, p), leave: 1 / psy.GetMoistAirVolume(leave[0], wl, p) }[basis];
    m = flow * 60 * perVolume; // lb/h
  } else {
    const perVolume = { standard: 1.2, enter: 1 / psy.GetMoistAirVolume(enter[0], we, p), leave: 1 / psy.GetMoistAirVolume(leave[0], wl, p) }[basis];
    m = (flow / 1000) * perVolume; // kg/s
  }
  const dh = he - hl;
  const sign = dh > 0 ? 1 : -1;
  const total = m * dh * sign;
  const sensible = m * (hel - hl) * sign;
  capacities.push({
    units: units,
    elevation: elevation,
    pressure: num(p * sys.pScale),
    flow: flow,
    basis: basis,
    enter_dry_bulb: enter[0],
    enter_wet_bulb: enter[1],
    leave_dry_bulb: leave[0],
    leave_wet_bulb: leave[1],
    process: sign > 0 ? 'cooling' : 'heating',
    mass_flow: num(m),
    delta_h: num(dh),
    total: num(total),
    sensible: num(sensible),
    latent: num(total - sensible),
  });
}

const lines = [];
lines.push('{');
lines.push('  "source": ' + JSON.stringify('psychrolib ' + libVersion + ' (npm), run by testdata/psychrolib/gen.js') + ',');
lines.push('  "units": ' + JSON.stringify({
  ip: 'temperatures °F, elevation ft, pressure psia, rel_hum %, hum_ratio lb/lb, enthalpy Btu/lb dry air, spec_volume ft³/lb dry air, density lb/ft³ moist air, flow cfm, mass_flow lb/h dry air, capacity Btu/h',
  si: 'temperatures °C, elevation m, pressure kPa, rel_hum %, hum_ratio kg/kg, enthalpy kJ/kg dry air, spec_volume m³/kg dry air, density kg/m³ moist air, flow L/s, mass_flow kg/s dry air, capacity kW',
}) + ',');
lines.push('  "states": [');
states.forEach((s, i) => lines.push('    ' + JSON.stringify(s) + (i < states.length - 1 ? ',' : '')));
lines.push('  ],');
lines.push('  "capacities": [');
capacities.forEach((c, i) => lines.push('    ' + JSON.stringify(c) + (i < capacities.length - 1 ? ',' : '')));
lines.push('  ]');
lines.push('}');
process.stdout.write(lines.join('\n') + '\n');
