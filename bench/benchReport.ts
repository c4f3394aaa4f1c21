/**
 * The benchmark's tables, targets and the machine they were measured on, as Markdown: printed at
 * the end of a run and, for a full run, written to docs/benchmarks.md (benchmarksDoc.ts).
 */
import { readFileSync } from 'node:fs';
import { cpus, loadavg, totalmem, availableParallelism } from 'node:os';
import type { Measurement } from './measureChild';
import type { TableShape } from './benchShapes';
import { TOOL_NAMES, type ToolId } from './benchTools';

export interface TableRun {
  shape: TableShape;
  tool: ToolId;
  measurement: Measurement;
  answer: { rows?: number; crossValidated?: string };
}

export interface Summary {
  seconds: number;
  cpuSeconds: number;
  maxRssMB: number;
  runs: number;
  failed: number;
  answer: { rows?: number; crossValidated?: string };
}

export const median = (values: number[]): number => {
  const sorted = values.filter((v) => Number.isFinite(v)).sort((a, b) => a - b);
  if (sorted.length === 0) return NaN;
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 ? sorted[middle]! : (sorted[middle - 1]! + sorted[middle]!) / 2;
};

export function summarize(runs: TableRun[]): Summary {
  const good = runs.filter((r) => r.measurement.ok);
  return {
    seconds: median(good.map((r) => r.measurement.seconds)),
    cpuSeconds: median(good.map((r) => r.measurement.userSeconds + r.measurement.systemSeconds)),
    maxRssMB: Math.max(...good.map((r) => r.measurement.maxRssBytes / 1e6)),
    runs: good.length,
    failed: runs.length - good.length,
    answer: good[0]?.answer ?? {},
  };
}

const fixed = (value: number, digits: number): string => (Number.isFinite(value) ? value.toFixed(digits) : 'n/a');

/** One Markdown table per data shape: median wall time, MB/s, CPU, peak RSS, ratios. */
export function tableMarkdown(shape: TableShape, csvBytes: number, rows: Map<ToolId, Summary>, layout?: string): string {
  const ours = rows.get('scatterwise');
  const lines = [
    `**${shape.title}** (${(csvBytes / 1e6).toFixed(0)} MB as CSV${shape.format === 'parquet' ? '; MB/s are CSV-equivalent' : ''}${layout ? `; ${layout}` : ''})`,
    '',
    '| tool | median wall s | MB/s | CPU s | peak RSS MB | scatterwise faster by | ÷ floor (time) | rows | cross-validated accuracy |',
    '|---|---:|---:|---:|---:|---:|---:|---:|---|',
  ];
  const floor = rows.get('floor');
  for (const [tool, s] of rows) {
    const faster = ours && (tool === 'notebook' || tool === 'r') ? `${fixed(s.seconds / ours.seconds, 1)}×` : '';
    const floorRatio = floor && tool !== 'floor' ? fixed(floor.seconds / s.seconds, 2) : '';
    const failed = s.failed > 0 ? ` (${s.failed} failed)` : '';
    lines.push(
      `| ${TOOL_NAMES[tool]}${failed} | ${fixed(s.seconds, 2)} | ${fixed(csvBytes / 1e6 / s.seconds, 1)} | ${fixed(s.cpuSeconds, 2)} | ${fixed(s.maxRssMB, 0)} | ${faster} | ${floorRatio} | ${s.answer.rows?.toLocaleString('en') ?? ''} | ${s.answer.crossValidated ?? ''} |`,
    );
  }
  return lines.join('\n');
}

export interface Target {
  what: string;
  holds: boolean | null;
  measured: string;
}

export function targetsMarkdown(targets: Target[]): string {
  return targets.map((t) => `- ${t.holds === null ? 'not measured' : t.holds ? '**holds**' : '**missed**'}: ${t.what} — ${t.measured}`).join('\n');
}

export interface Machine {
  date: string;
  cpu: string;
  cores: number;
  memoryGiB: number;
  node: string;
  python?: string;
  r?: string;
  loadBefore: string;
  loadAfter?: string;
}

export function describeMachine(versions: { python?: string; r?: string }): Machine {
  let cpu = cpus()[0]?.model ?? 'unknown';
  try {
    const model = /^model name\s*:\s*(.+)$/m.exec(readFileSync('/proc/cpuinfo', 'utf8'))?.[1];
    if (model) cpu = model.trim();
  } catch {
    // Not Linux: os.cpus() has the model.
  }
  return {
    date: new Date().toISOString().replace(/\.\d+Z$/, 'Z'),
    cpu,
    cores: availableParallelism(),
    memoryGiB: totalmem() / 2 ** 30,
    node: process.version,
    ...versions,
    loadBefore: loadavg().map((l) => l.toFixed(1)).join(', '),
  };
}

export function machineMarkdown(m: Machine): string {
  return [
    `- measured ${m.date}`,
    `- ${m.cores} cores (nproc), ${m.cpu}, ${m.memoryGiB.toFixed(1)} GiB memory`,
    `- Node ${m.node}${m.python ? `; ${m.python}` : ''}${m.r ? `; ${m.r}` : ''}`,
    `- load average (1, 5, 15 min) before the run ${m.loadBefore}${m.loadAfter ? `, after ${m.loadAfter}` : ''} — the machine is shared (a virtual machine): wall times carry the other load, and so at times do CPU seconds (the same run of the same build took 10 s of CPU in one hour and 14 s in another)`,
  ].join('\n');
}
