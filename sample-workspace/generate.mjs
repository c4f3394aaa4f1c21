// Writes the invented demo tables of sample-workspace/data/: vibration and acoustic features of a
// fleet of centrifugal pumps, labelled by fault type. Deterministic: a seeded generator and only
// exact arithmetic (no Math.log/exp/cos, whose last bit may differ between engines), numbers printed
// with a fixed number of significant digits, so every run writes byte-identical files.
//
//   node sample-workspace/generate.mjs
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parquetWriteBuffer } from 'hyparquet-writer';

const here = dirname(fileURLToPath(import.meta.url));
const outDir = join(here, 'data');

// ---- randomness ------------------------------------------------------------------------------

/** Mulberry32: a small 32-bit generator; integer operations only, so identical on every engine. */
function createRandom(seed) {
  let state = seed >>> 0;
  const uniform = () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  /** Approximately standard normal: the sum of twelve uniforms minus six (Irwin–Hall), exact arithmetic. */
  const normal = () => {
    let sum = 0;
    for (let i = 0; i < 12; i++) sum += uniform();
    return sum - 6;
  };
  const integer = (n) => Math.floor(uniform() * n);
  const shuffle = (items) => {
    for (let i = items.length - 1; i > 0; i--) {
      const j = integer(i + 1);
      [items[i], items[j]] = [items[j], items[i]];
    }
    return items;
  };
  return { uniform, normal, integer, shuffle };
}

// ---- formatting --------------------------------------------------------------------------------

/** A number with `digits` significant digits, shortest form (toPrecision is exactly specified). */
function significant(value, digits) {
  const text = String(Number(value.toPrecision(digits)));
  return text === '-0' ? '0' : text;
}

/** a − b for two decimal strings, computed exactly in scaled integers, printed without rounding. */
function decimalDifference(a, b) {
  const decimals = (s) => (s.includes('.') ? s.length - s.indexOf('.') - 1 : 0);
  const places = Math.max(decimals(a), decimals(b));
  const scaled = (s) => BigInt(s.replace('.', '') + '0'.repeat(places - decimals(s)));
  const difference = scaled(a) - scaled(b);
  const negative = difference < 0n;
  let digits = (negative ? -difference : difference).toString().padStart(places + 1, '0');
  if (places > 0) digits = `${digits.slice(0, -places)}.${digits.slice(-places)}`.replace(/\.?0+$/, '');
  return (negative ? '-' : '') + digits;
}

function toDelimited(header, rows, delimiter) {
  return [header, ...rows].map((cells) => cells.join(delimiter)).join('\n') + '\n';
}

// ---- the pump fleet ----------------------------------------------------------------------------

const FEATURES = [
  'rms_velocity_mm_s',
  'kurtosis',
  'crest_factor',
  'band_energy_1x',
  'band_energy_2x',
  'acoustic_db',
  'spectral_centroid_hz',
  'temperature_c',
  'flow_m3_h',
  'suction_pressure_kpa',
];

/** Rows per fault class: unequal on purpose (healthy pumps are the common case). */
const FAULT_COUNTS = [
  ['healthy', 620],
  ['impeller-wear', 390],
  ['cavitation', 300],
  ['bearing-defect', 190],
];

/** Mean shifts of each fault relative to a healthy pump, per feature. */
const FAULT_SHIFTS = {
  healthy: {},
  'impeller-wear': { rms_velocity_mm_s: 0.3, band_energy_1x: 0.55, band_energy_2x: 0.12, spectral_centroid_hz: -30, temperature_c: 0.6, flow_m3_h: -5, suction_pressure_kpa: -1 },
  cavitation: { rms_velocity_mm_s: 0.5, kurtosis: 0.35, crest_factor: 0.2, band_energy_1x: 0.15, acoustic_db: 3.2, spectral_centroid_hz: 260, flow_m3_h: -4, suction_pressure_kpa: -16 },
  'bearing-defect': { rms_velocity_mm_s: 0.7, kurtosis: 0.9, crest_factor: 0.5, band_energy_1x: 0.2, band_energy_2x: 0.3, acoustic_db: 1.4, spectral_centroid_hz: 300, temperature_c: 4.5 },
};

const PUMP_COUNT = 160;

/**
 * One pump record. A shared operating point (`load`) and a per-pump offset make the features
 * correlate the way field data do; bearing defects also spread kurtosis wider (unequal covariances).
 */
function pumpRecord(random, fault, pumpOffsets) {
  const pump = random.integer(PUMP_COUNT);
  const shift = FAULT_SHIFTS[fault];
  const s = (name) => shift[name] ?? 0;
  const load = random.normal();
  const offset = pumpOffsets[pump];
  const kurtosisSpread = fault === 'bearing-defect' ? 0.55 : 0.3;
  const kurtosis = Math.max(1.6, 3.0 + s('kurtosis') + kurtosisSpread * random.normal());
  const band1xNoise = random.normal();
  const values = {
    rms_velocity_mm_s: Math.max(0.3, 2.6 + s('rms_velocity_mm_s') + 0.35 * load + 0.25 * offset + 0.35 * random.normal()),
    kurtosis,
    crest_factor: 3.1 + s('crest_factor') + 0.4 * (kurtosis - 3.0 - s('kurtosis')) + 0.2 * random.normal(),
    band_energy_1x: Math.max(0.2, 3.8 + s('band_energy_1x') + 0.6 * load + 0.5 * band1xNoise),
    band_energy_2x: Math.max(0.05, 1.3 + s('band_energy_2x') + 0.2 * load + 0.12 * band1xNoise + 0.2 * random.normal()),
    acoustic_db: 76 + s('acoustic_db') + 1.2 * load + 1.6 * random.normal(),
    spectral_centroid_hz: 1850 + s('spectral_centroid_hz') + 60 * load + 130 * random.normal(),
    temperature_c: 44 + s('temperature_c') + 2 * load + 1.5 * offset + 1.8 * random.normal(),
    flow_m3_h: 118 + s('flow_m3_h') + 14 * load + 5 * random.normal(),
    suction_pressure_kpa: 175 + s('suction_pressure_kpa') - 3 * load + 9 * random.normal(),
  };
  const digits = { spectral_centroid_hz: 5, flow_m3_h: 5, suction_pressure_kpa: 5, acoustic_db: 4, temperature_c: 4 };
  const cells = FEATURES.map((name) => significant(values[name], digits[name] ?? 4));
  return { pumpId: `PU-${String(1001 + pump)}`, fault, cells };
}

function pumpFleet(seed) {
  const random = createRandom(seed);
  const pumpOffsets = Array.from({ length: PUMP_COUNT }, () => random.normal());
  const faults = random.shuffle(FAULT_COUNTS.flatMap(([fault, count]) => Array(count).fill(fault)));
  return faults.map((fault) => pumpRecord(random, fault, pumpOffsets));
}

const PUMP_HEADER = ['pump_id', ...FEATURES, 'fault'];
const pumpRow = (record) => [record.pumpId, ...record.cells, record.fault];

// ---- seal leaks (two classes) ------------------------------------------------------------------

const SEAL_FEATURES = ['seal_chamber_temp_c', 'seal_face_vibration_mm_s', 'motor_current_a', 'discharge_pressure_kpa', 'acoustic_emission_db', 'humidity_pct'];

function sealRecords(seed) {
  const random = createRandom(seed);
  const labels = random.shuffle([...Array(420).fill('no-leak'), ...Array(180).fill('leak')]);
  return labels.map((label) => {
    const leak = label === 'leak' ? 1 : 0;
    const load = random.normal();
    const values = [
      52 + 3.5 * leak + 2.2 * load + 2.4 * random.normal(),
      1.4 + 0.35 * leak + 0.15 * load + 0.3 * random.normal(),
      31 + 0.4 * leak + 2.5 * load + 1.1 * random.normal(),
      410 - 12 * leak + 18 * load + 15 * random.normal(),
      61 + 2.1 * leak + 0.8 * load + 2.2 * random.normal(),
      48 + 3 * leak + 9 * random.normal(),
    ];
    const digits = [4, 3, 4, 4, 4, 3];
    return [`PU-${1001 + random.integer(PUMP_COUNT)}`, ...values.map((v, i) => significant(Math.max(v, 0.1), digits[i])), label];
  });
}

// ---- the same fleet with planted defects -------------------------------------------------------

/**
 * 420 pump records with one planted problem of each kind a data-quality check should find; the
 * comment beside each says which. Columns added to the ten features:
 *   rated_speed_rpm      constant (2950 everywhere)
 *   work_order_code      leaks the label: the fault's code times 1000 plus a serial number
 *   rms_velocity_export  an exact copy of rms_velocity_mm_s
 *   band_energy_excess   band_energy_1x − band_energy_2x, exactly (a linearly dependent column)
 *   sensor_gain          1 on every row but three (near-constant)
 */
function defectRows(seed) {
  const random = createRandom(seed + 1);
  const records = pumpFleet(seed).slice(0, 420);
  const faultCode = { healthy: 0, 'impeller-wear': 1, cavitation: 2, 'bearing-defect': 3 };
  const header = [...PUMP_HEADER.slice(0, -1), 'rated_speed_rpm', 'work_order_code', 'rms_velocity_export', 'band_energy_excess', 'sensor_gain', 'fault'];
  const rows = records.map((record, index) => {
    const [rms, , , band1x, band2x] = record.cells;
    const code = String(faultCode[record.fault] * 1000 + 100 + random.integer(900));
    const gain = index === 57 || index === 211 || index === 388 ? '1.05' : '1';
    return [record.pumpId, ...record.cells, '2950', code, rms, decimalDifference(band1x, band2x), gain, record.fault];
  });
  const column = (name) => header.indexOf(name);
  // Missing values: `NA` in acoustic_db on 6 rows, empty cells in temperature_c on 5 rows.
  for (const row of [12, 48, 95, 160, 233, 301]) rows[row][column('acoustic_db')] = 'NA';
  for (const row of [20, 77, 140, 260, 355]) rows[row][column('temperature_c')] = '';
  // A non-numeric cell in a numeric column, and an infinite value.
  rows[133][column('kurtosis')] = 'offline';
  rows[277][column('crest_factor')] = 'Inf';
  // A tiny class: two rows relabelled with a fault seen nowhere else.
  rows[64][column('fault')] = 'shaft-misalignment';
  rows[318][column('fault')] = 'shaft-misalignment';
  // Duplicate rows: three records exported twice.
  rows.splice(150, 0, [...rows[30]]);
  rows.splice(290, 0, [...rows[200]]);
  rows.push([...rows[410]]);
  return { header, rows };
}

// ---- writing -----------------------------------------------------------------------------------

function main() {
  mkdirSync(outDir, { recursive: true });
  const fleet = pumpFleet(20240611);
  const pumpRows = fleet.map(pumpRow);
  writeFileSync(join(outDir, 'pump-faults.csv'), toDelimited(PUMP_HEADER, pumpRows, ','));
  writeFileSync(join(outDir, 'pump-faults.tsv'), toDelimited(PUMP_HEADER, pumpRows, '\t'));

  const parquet = parquetWriteBuffer({
    codec: 'SNAPPY',
    createdBy: 'scatterwise sample-workspace/generate.mjs',
    columnData: [
      { name: 'pump_id', data: fleet.map((r) => r.pumpId), type: 'STRING' },
      ...FEATURES.map((name, i) => ({ name, data: fleet.map((r) => Number(r.cells[i])), type: 'DOUBLE' })),
      { name: 'fault', data: fleet.map((r) => r.fault), type: 'STRING' },
    ],
  });
  writeFileSync(join(outDir, 'pump-faults.parquet'), new Uint8Array(parquet));

  writeFileSync(join(outDir, 'seal-leak.csv'), toDelimited(['pump_id', ...SEAL_FEATURES, 'fault'], sealRecords(7130), ','));

  const defects = defectRows(4471);
  writeFileSync(join(outDir, 'pump-faults-defects.csv'), toDelimited(defects.header, defects.rows, ','));
}

main();
