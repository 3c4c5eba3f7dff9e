// Words for the fields the server can name in an error, per kind of record,
// so a message reads "Design airflow is required", never "design.airflow".
// The forms use the same words. A Go test checks every field has one.

export const LABELS = {
  any: { id: '', job_id: 'Job', system_id: 'System', tag: 'Tag', name: 'Name', location: 'Location', remarks: 'Remarks', units: 'Units', kind: 'Kind' },
  job: {
    name: 'Job name', site_address: 'Site address', client: 'Client', engineer: 'Engineer', contractor: 'Contractor',
    tab_firm: 'Balancing firm', project_number: 'Project number', elevation: 'Site elevation', barometric: 'Barometric pressure',
    status: 'Status', 'tolerances.outlet_low_pct': 'Outlets, below design', 'tolerances.outlet_high_pct': 'Outlets, above design',
    'tolerances.fan_low_pct': 'Fans, below design', 'tolerances.fan_high_pct': 'Fans, above design',
    'tolerances.hydronic_low_pct': 'Water flow, below design', 'tolerances.hydronic_high_pct': 'Water flow, above design',
  },
  instrument: {
    kind: 'Instrument', make: 'Make', model: 'Model', serial: 'Serial number', calibrated_on: 'Calibrated on',
    calibration_due: 'Calibration due', accuracy_pct: 'Accuracy, ± of reading', accuracy_abs: 'Accuracy, ± value', accuracy_unit: 'Unit of the ± value',
  },
  system: { kind: 'Kind of system' },
  // a system's design and nameplate fields, "design.airflow" and so on
  design: {
    airflow: 'Design airflow', outdoor_air: 'Design outdoor air', external_static: 'External static pressure',
    rated_total: 'Rated total capacity', rated_sensible: 'Rated sensible capacity', water_flow: 'Design water flow',
    perf_table_csv: 'Performance table', make: 'Unit make', model: 'Unit model', serial: 'Unit serial number', motor_make: 'Motor make',
    motor_hp: 'Motor power', volts: 'Motor volts', phase: 'Phase', fla: 'Full-load amps', motor_rpm: 'Motor speed', fan_rpm: 'Fan speed',
    motor_frame: 'Motor frame', service_factor: 'Service factor', fan_sheave_size: 'Fan sheave, as stamped',
    fan_sheave_pitch: 'Fan sheave pitch diameter', motor_sheave_size: 'Motor sheave, as stamped',
    motor_sheave_pitch: 'Motor sheave pitch diameter', belts: 'Belts', fan_bushing: 'Fan bushing', motor_bushing: 'Motor bushing',
    filters: 'Filters',
  },
  outlet: { kind: 'Kind of outlet', room: 'Room', size: 'Size', design_flow: 'Design airflow', method: 'Method', factor: 'Hood correction factor', ak: 'Ak (effective area)' },
  traverse: {
    shape: 'Duct shape', method: 'Method', width: 'Duct width', height: 'Duct height', diameter: 'Duct diameter',
    points_w: 'Points per line', points_h: 'Lines', points_per_diameter: 'Points per diameter', diameters: 'Diameters',
  },
  capacity_test: { mode: 'Cooling or heating', flow_source: 'Airflow from', traverse_id: 'Traverse', flow_basis: 'Airflow measured at' },
  water_test: {
    mode: 'Cooling or heating', flow_source: 'Water flow from', valve_cv: 'Valve flow coefficient', valve_accuracy_pct: "Valve's stated flow accuracy",
    fluid: 'Fluid', concentration: 'Glycol concentration', design_flow: 'Design water flow', capacity_test_id: 'Capacity test',
  },
};

// labelOf('system', 'design.airflow') → "Design airflow". A field with no
// words falls back to its last part in words, never a dotted name.
export function labelOf(kind, field) {
  const f = field || '';
  const [g, k] = f.startsWith('design.') ? ['design', f.slice(7)] : [kind, f];
  const w = (LABELS[g] || {})[k] || LABELS.any[f] || f.split('.').pop().replace(/_/g, ' ');
  return w.charAt(0).toUpperCase() + w.slice(1);
}

// errorText(kind, e, label): the server's message after its field's label
// (label: the one the form shows, when it differs).
export function errorText(kind, e, label) {
  const m = (e && e.message) || String(e);
  // A message about the record itself (field id) names it already.
  if (!e || !e.field || (e.field === 'id' && !label)) return m.charAt(0).toUpperCase() + m.slice(1);
  return `${label || labelOf(kind, e.field)}${/^(is|must|applies|contains|cannot|needs|names|refers|has)\b/.test(m) ? ' ' : ': '}${m}`;
}
