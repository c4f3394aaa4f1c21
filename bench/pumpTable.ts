/**
 * The benchmarks' invented table: vibration and acoustic features of a pump fleet labelled by
 * fault type. Float features printed with 6 significant digits (toPrecision, so magnitudes from
 * 1e-8 to 1e6 come out partly in exponent form), class labels of which one is quoted with a comma
 * inside, rows cycling through the classes. Deterministic: Park–Miller uniforms, Box–Muller
 * normals, the same bytes on every run and machine. Written straight to disk, 10 000 rows at a
 * time, so memory stays small whatever the size.
 */
import { closeSync, openSync, writeSync } from 'node:fs';

/** Fault types; the second is quoted in the file (it holds a comma). */
export const PUMP_FAULTS = [
  'healthy',
  'bearing, outer race',
  'cavitation',
  'impeller imbalance',
  'seal leak',
  'misalignment',
  'soft foot',
  'mechanical looseness',
  'impeller wear',
  'motor winding',
];

export interface PumpTableSpec {
  features: number;
  classes: number;
  /** Write rows until the file holds at least this many bytes … */
  bytes?: number;
  /** … or exactly this many rows. */
  rows?: number;
}

export const LABEL_COLUMN = 'fault';

/** Writes the table; returns its data rows and bytes. */
export function writePumpCsv(path: string, spec: PumpTableSpec): { rows: number; bytes: number } {
  if (spec.classes > PUMP_FAULTS.length) throw new RangeError(`at most ${PUMP_FAULTS.length} classes`);
  let state = 42;
  const uniform = (): number => {
    state = (state * 48271) % 2147483647;
    return state / 2147483647;
  };
  const normal = (): number => Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
  const scale = Array.from({ length: spec.features }, (_, j) => 10 ** ((j % 8) * 2 - 8));
  const labels = PUMP_FAULTS.slice(0, spec.classes).map((label) => (label.includes(',') ? `"${label}"` : label));
  const file = openSync(path, 'w');
  const header = [...Array.from({ length: spec.features }, (_, j) => `feature_${j + 1}`), LABEL_COLUMN].join(',') + '\n';
  writeSync(file, header);
  let written = header.length;
  let row = 0;
  const more = (): boolean => (spec.rows !== undefined ? row < spec.rows : written < (spec.bytes ?? 0));
  while (more()) {
    const lines: string[] = [];
    for (let i = 0; i < 10_000 && (spec.rows === undefined || row < spec.rows); i++, row++) {
      const k = row % spec.classes;
      const cells = scale.map((s, j) => ((j % 3 === 0 ? k : 0) + 2 + normal()) * s);
      lines.push(cells.map((value) => value.toPrecision(6)).join(',') + ',' + labels[k]);
    }
    const text = lines.join('\n') + '\n';
    writeSync(file, text);
    written += Buffer.byteLength(text);
  }
  closeSync(file);
  return { rows: row, bytes: written };
}
