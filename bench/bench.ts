/**
 * `npm run bench`: the side-by-side benchmark (not a unit test). Generates its tables on the fly
 * into the git-ignored bench-data/ (never committed), then, alternating over several rounds, runs
 * on the same files: the floor (reading the file), scatterwise (and, on the narrow table, its CSV
 * reader alone and csv-parse alone, the reader's targets), and — when installed — the
 * notebook way (pandas + scikit-learn) and the R way (data.table + MASS), each in a child process
 * of its own so its peak memory is its own. Besides the tables it measures the moments update
 * against numpy's X.T @ X, the fit from moments at d = 1000, the panel's frame times in headless
 * Chromium and the editor's provisional answer and host event-loop delay in a real VS Code.
 * Prints median wall time, MB/s, CPU time, peak RSS, the ratios to each alternative and to the
 * floor, and whether each target holds; a full run writes the results to docs/benchmarks.md.
 *
 *   npm run bench                                  every shape, 3 rounds, writes docs/benchmarks.md
 *   npm run bench -- --quick                       small sizes, one round (CI smoke run, < 2 min)
 *   npm run bench -- --shapes narrow,kernel        some shapes only (the editor host: `editor`)
 *   npm run bench -- --rounds 5
 *
 * Shapes: narrow (1 GB CSV × 20 features × 5 classes), wide200 (100 MB × 200 features), wide1000
 * (20 000 rows × 1 000 features × 10 classes), parquet and parquet-1 (the narrow table as snappy
 * Parquet written by DuckDB, default row groups and one row group), kernel, frames, editor.
 */
import { spawnSync } from 'node:child_process';
import { closeSync, existsSync, mkdirSync, openSync, readSync, statSync, writeFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import { isMainThread, workerData } from 'node:worker_threads';
import { join, resolve } from 'node:path';
import { ALL_SHAPES, QUICK_SHAPES, layoutText, parquetLayout, prepareTable, sizes, tableShapes, type ParquetLayout, type ShapeId, type TableShape } from './benchShapes';
import { answerOf, checkAlternatives, commandFor, PYTHON, toolsFor, TOOL_NAMES, type ToolId } from './benchTools';
import { benchmarksDocument } from './benchmarksDoc';
import { describeMachine, machineMarkdown, median, summarize, tableMarkdown, targetsMarkdown, type Summary, type TableRun, type Target } from './benchReport';
import type { FrameTimes } from './editor/frameTimes';
import { kernelThread, measureKernel, writeKernelRows, type KernelResult, type KernelThreadData } from './kernel';
import { measureCommand } from './measureChild';
import { DEFAULT_SPILL_LIMITS } from '../src/core/read/scratch';

const REPOSITORY = resolve(__dirname, '..', '..');
const DATA = join(REPOSITORY, 'bench-data');

function argument(name: string): string | undefined {
  const at = process.argv.indexOf(`--${name}`);
  return at >= 0 && at + 1 < process.argv.length ? process.argv[at + 1] : undefined;
}

/** `--child KIND`: the measurements that run in a process of their own. */
async function child(kind: string): Promise<void> {
  const file = argument('file') ?? '';
  if (kind === 'floor') {
    const handle = openSync(file, 'r');
    const buffer = Buffer.allocUnsafe(4 * 1024 * 1024);
    let lines = 0;
    for (let position = 0; ; ) {
      const read = readSync(handle, buffer, 0, buffer.length, position);
      if (read === 0) break;
      position += read;
      for (let at = buffer.indexOf(10, 0); at >= 0 && at < read; at = buffer.indexOf(10, at + 1)) lines++;
    }
    closeSync(handle);
    process.stdout.write(`${JSON.stringify({ lines })}\n`);
  } else if (kind === 'prepare') {
    const quick = process.argv.includes('--quick');
    const shape = tableShapes(DATA, sizes(quick)).find((s) => s.id === argument('shape'))!;
    await prepareTable(shape, sizes(quick));
  } else if (kind === 'kernel') {
    const [n, d, classes] = ['n', 'd', 'classes'].map((name) => Number(argument(name)));
    writeKernelRows(file, n!, d!, classes!);
    process.stdout.write(`${JSON.stringify(await measureKernel(file, n!, d!, classes!, process.argv.includes('--fit')))}\n`);
  } else throw new Error(`unknown child ${kind}`);
}

function lastJson<T>(text: string): T {
  return JSON.parse(text.trim().split('\n').pop()!) as T;
}

const mb = (bytes: number): string => (bytes / 1e6).toFixed(0);

interface KernelPair {
  d: number;
  n: number;
  ours: KernelResult[];
  numpy: number[];
}

async function main(): Promise<void> {
  if (!isMainThread) return kernelThread((workerData as { kernelThread: KernelThreadData }).kernelThread);
  const kind = argument('child');
  if (kind) return child(kind);

  const quick = process.argv.includes('--quick');
  const rounds = Number(argument('rounds') ?? (quick ? 1 : 3));
  const shapes = (argument('shapes')?.split(',') ?? (quick ? QUICK_SHAPES : ALL_SHAPES)) as ShapeId[];
  for (const shape of shapes) if (!ALL_SHAPES.includes(shape)) throw new Error(`unknown shape ${shape}; shapes: ${ALL_SHAPES.join(', ')}`);
  const full = !quick && ALL_SHAPES.every((s) => shapes.includes(s));
  const writeDocs = full || process.argv.includes('--docs');
  const script = process.argv[1]!;
  if (!existsSync(join(REPOSITORY, 'dist/cli.js'))) throw new Error('dist/cli.js is missing: run `node esbuild.mjs` first (npm run bench does).');
  mkdirSync(DATA, { recursive: true });

  const available = checkAlternatives();
  const machine = describeMachine(available.versions);
  console.log(`${quick ? 'quick' : 'full'} run, ${rounds} round(s), shapes ${shapes.join(', ')}`);
  if (!available.notebook) console.log(`(${PYTHON} with pandas and scikit-learn not found: the notebook column stays empty)`);
  if (!available.r) console.log('(Rscript with MASS and data.table not found: the R column stays empty)');

  // Data, each table written in a child process (so this process stays small: on Linux a child's
  // maxRSS starts from its parent's at spawn time).
  const s = sizes(quick);
  const tables = tableShapes(DATA, s).filter((t) => shapes.includes(t.id));
  // The editor opens the 1 GB table as CSV and as both Parquet copies.
  const editorTables = shapes.includes('editor') ? tableShapes(DATA, s).filter((t) => t.id === 'narrow' || t.format === 'parquet') : [];
  const toPrepare = [...tables, ...editorTables.filter((t) => !tables.includes(t))];
  for (const table of toPrepare) {
    const made = spawnSync(process.execPath, [script, '--child', 'prepare', '--shape', table.id, ...(quick ? ['--quick'] : [])], { stdio: 'inherit' });
    if (made.status !== 0) throw new Error(`preparing ${table.id} failed`);
  }

  // The table runs, alternating: every tool once per round, the order turning each round.
  const runs: TableRun[] = [];
  const plan = tables.flatMap((table) => toolsFor(table, available).map((tool) => ({ table, tool })));
  for (const { table } of plan.filter((p) => p.tool === 'floor')) measureCommand(...commandFor('floor', table, script, REPOSITORY)); // warm the page cache
  for (let round = 0; round < rounds; round++) {
    const order = plan.map((_, i) => plan[(i + round) % plan.length]!);
    for (const { table, tool } of order) {
      const [command, args] = commandFor(tool, table, script, REPOSITORY);
      const measurement = measureCommand(command, args, { cwd: REPOSITORY });
      const answer = answerOf(tool, measurement.stdout);
      runs.push({ shape: table, tool, measurement, answer });
      const status = measurement.ok ? '' : `  FAILED: ${measurement.stderr.trim().split('\n').slice(-3).join(' | ')}`;
      console.log(
        `round ${round + 1}  ${table.id.padEnd(9)} ${TOOL_NAMES[tool].padEnd(28)} ${measurement.seconds.toFixed(2).padStart(8)} s  cpu ${(measurement.userSeconds + measurement.systemSeconds).toFixed(2).padStart(7)} s  ${(measurement.maxRssBytes / 1e6).toFixed(0).padStart(6)} MB${status}`,
      );
    }
  }

  // The moments update against numpy, and the fit from moments, alternating too.
  const kernels: KernelPair[] = [];
  if (shapes.includes('kernel')) {
    const pairs = [
      { d: 200, n: quick ? 2000 : 50000, fit: false },
      { d: 1000, n: quick ? 1000 : 20000, fit: true },
    ];
    for (const pair of pairs) {
      const file = join(DATA, `kernel-${pair.n}x${pair.d}.f64`);
      const result: KernelPair = { d: pair.d, n: pair.n, ours: [], numpy: [] };
      for (let round = 0; round < rounds; round++) {
        const ours = measureCommand(process.execPath, [script, '--child', 'kernel', '--file', file, '--n', String(pair.n), '--d', String(pair.d), '--classes', '10', ...(pair.fit ? ['--fit'] : [])]);
        if (!ours.ok) throw new Error(`kernel d=${pair.d} failed: ${ours.stderr}`);
        result.ours.push(lastJson<KernelResult>(ours.stdout));
        if (available.notebook) {
          const numpy = measureCommand(PYTHON, [join(REPOSITORY, 'bench/alternatives/cross_product.py'), file, String(pair.n), String(pair.d)]);
          if (numpy.ok) result.numpy.push(lastJson<{ seconds: number }>(numpy.stdout).seconds);
        }
        const last = result.ours[result.ours.length - 1]!;
        console.log(`round ${round + 1}  kernel d=${pair.d} n=${pair.n}: moments update steady ${last.momentsSeconds.toFixed(3)} s, fresh ${last.momentsFreshSeconds.toFixed(3)} s (two threads ${last.twoThreadSeconds.toFixed(3)} s, fresh ${last.twoThreadFreshSeconds.toFixed(3)} s), numpy ${result.numpy[result.numpy.length - 1]?.toFixed(3) ?? 'n/a'} s${last.solveLdaSeconds !== undefined ? `, solveLda ${last.solveLdaSeconds.toFixed(3)} s, fitMoments ${last.fitMomentsSeconds!.toFixed(3)} s` : ''}`);
      }
      kernels.push(result);
    }
  }

  // The panel's frame times.
  let frames: FrameTimes[] = [];
  if (shapes.includes('frames')) {
    const points = quick ? '50000' : '50000,1000000';
    const run = measureCommand(process.execPath, [join(REPOSITORY, 'out/bench/editor/frameTimes.js'), '--points', points, '--seconds', quick ? '2' : '5']);
    if (run.ok) frames = lastJson<FrameTimes[]>(run.stdout);
    else console.log(`frames FAILED: ${run.stderr.trim().split('\n').slice(-5).join(' | ')}`);
    for (const f of frames) console.log(`frames ${f.points} points: p50 ${f.p50.toFixed(1)} ms, p95 ${f.p95.toFixed(1)} ms, max ${f.max.toFixed(1)} ms over ${f.frames} frames; first drawn ${f.firstDrawSeconds.toFixed(2)} s after the result`);
  }

  // The editor in a real VS Code: provisional answer and host event-loop delay on the narrow table,
  // as CSV and as both Parquet copies.
  const editor: EditorFigures[] = [];
  for (const table of editorTables) {
    const figures = runEditor(table, rounds);
    if (figures) editor.push(figures);
  }

  // Summaries, targets, tables.
  machine.loadAfter = loadavg().map((l) => l.toFixed(1)).join(', ');
  const summaries = new Map<string, Map<ToolId, Summary>>();
  for (const table of tables) {
    const rows = new Map<ToolId, Summary>();
    for (const tool of toolsFor(table, available)) rows.set(tool, summarize(runs.filter((r) => r.shape.id === table.id && r.tool === tool)));
    summaries.set(table.id, rows);
  }
  const layouts = new Map<string, ParquetLayout>();
  for (const table of tables) if (table.format === 'parquet') layouts.set(table.id, await parquetLayout(table.file));
  const targets = evaluateTargets(summaries, tables, layouts, kernels, frames, editor, quick);
  const sections: string[] = [];
  for (const table of tables) {
    const layout = layouts.get(table.id);
    sections.push(tableMarkdown(table, statSync(table.csv).size, summaries.get(table.id)!, layout ? layoutText(layout) : undefined));
  }
  if (kernels.length > 0) sections.push(kernelMarkdown(kernels));
  if (frames.length > 0) sections.push(framesMarkdown(frames));
  if (editor.length > 0) sections.push(editorMarkdown(editor));
  const results = [machineMarkdown(machine), '', ...sections.flatMap((section) => [section, '']), '**Targets**', '', targetsMarkdown(targets)].join('\n');
  console.log(`\n${results}\n`);
  if (writeDocs) {
    writeFileSync(join(REPOSITORY, 'docs/benchmarks.md'), benchmarksDocument(results, { rounds, quick }));
    console.log('written to docs/benchmarks.md');
  }
}

const EDITOR_FILE_KINDS: Partial<Record<TableShape['id'], string>> = { narrow: 'CSV', parquet: 'Parquet', 'parquet-1': 'Parquet, one row group' };

interface EditorFigures {
  /** Which copy of the table: CSV, Parquet, Parquet in one row group. */
  table: string;
  bytes: number;
  rows: number;
  provisionalSeconds: number;
  provisionalRows: number;
  fullSeconds: number;
  eventLoopDelayP99Ms: number;
  eventLoopDelayMaxMs: number;
  samples: number;
  /** Runs the figures summarise (one per round). */
  runs?: number;
}

/**
 * Runs test/extension/benchTimings.test.ts in VS Code's server build on the table, once per round
 * (each a fresh VS Code): the median of the times to the provisional answer and to the full fit, and
 * the worst run's event-loop delay.
 */
function runEditor(table: TableShape, rounds: number): EditorFigures | null {
  const all: EditorFigures[] = [];
  for (let round = 0; round < rounds; round++) {
    const run = spawnSync(process.execPath, [join(REPOSITORY, 'test/extension/runInServer.mjs'), '--grep', 'benchmark timings'], {
      cwd: REPOSITORY,
      encoding: 'utf8',
      maxBuffer: 64 << 20,
      env: { ...process.env, SCATTERWISE_BENCH_FILE: table.file },
    });
    const line = `${run.stdout}\n${run.stderr}`.split('\n').find((l) => l.includes('SCATTERWISE_BENCH '));
    if (!line) {
      console.log(`editor FAILED (exit ${run.status}): ${`${run.stdout}${run.stderr}`.trim().split('\n').slice(-8).join(' | ')}`);
      return null;
    }
    const figures = { ...(JSON.parse(line.slice(line.indexOf('SCATTERWISE_BENCH ') + 'SCATTERWISE_BENCH '.length)) as Omit<EditorFigures, 'table'>), table: EDITOR_FILE_KINDS[table.id] ?? table.id };
    console.log(`editor ${table.id} round ${round + 1}: provisional answer after ${figures.provisionalSeconds.toFixed(2)} s, full fit ${figures.fullSeconds.toFixed(1)} s, host event-loop delay p99 ${figures.eventLoopDelayP99Ms.toFixed(1)} ms`);
    all.push(figures);
  }
  type Timed = 'provisionalSeconds' | 'fullSeconds' | 'eventLoopDelayP99Ms' | 'eventLoopDelayMaxMs';
  const middle = (key: Timed): number => median(all.map((f) => f[key]));
  const worst = (key: Timed): number => Math.max(...all.map((f) => f[key]));
  return {
    ...all[0]!,
    provisionalSeconds: middle('provisionalSeconds'),
    fullSeconds: middle('fullSeconds'),
    eventLoopDelayP99Ms: worst('eventLoopDelayP99Ms'),
    eventLoopDelayMaxMs: worst('eventLoopDelayMaxMs'),
    runs: all.length,
  };
}

function kernelMarkdown(kernels: KernelPair[]): string {
  const lines = [
    '**Moments update and fit from moments** (rows in memory; median of the rounds, each the median of three runs). "Steady": the rows go into an accumulator that already holds them once (its scatters\' memory touched, as in the bulk of a long pass, and as numpy\'s timed products reuse the memory of its untimed first one); "fresh": into a new accumulator, whose K scatters of d × d doubles are touched for the first time. Both include finishing the moments (and for two threads handing them over and merging them). The two threads live for the whole measurement, as a fit\'s do, and claim shares of the rows as the parallel passes claim ranges of a file (large shares first, small ones last); their first split is not timed, as numpy\'s first product is not.',
    '',
    '| d | rows | scatterwise moments update s, one thread, steady | fresh | the same, two threads, steady | fresh | numpy X.T @ X s (all cores) | ratio (two threads, steady) | ratio (fresh) | solveLda s | whole fit from moments s |',
    '|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|',
  ];
  for (const k of kernels) {
    const figure = (key: 'momentsSeconds' | 'momentsFreshSeconds' | 'twoThreadSeconds' | 'twoThreadFreshSeconds' | 'solveLdaSeconds' | 'fitMomentsSeconds'): number => median(k.ours.map((r) => r[key] ?? NaN));
    const numpy = median(k.numpy);
    const seconds = (value: number): string => (Number.isFinite(value) ? value.toFixed(3) : '');
    const ratio = (value: number): string => (Number.isFinite(numpy) ? `${(value / numpy).toFixed(1)}×` : '');
    const two = figure('twoThreadSeconds');
    const twoFresh = figure('twoThreadFreshSeconds');
    lines.push(`| ${k.d} | ${k.n.toLocaleString('en')} | ${seconds(figure('momentsSeconds'))} | ${seconds(figure('momentsFreshSeconds'))} | ${seconds(two)} | ${seconds(twoFresh)} | ${Number.isFinite(numpy) ? numpy.toFixed(3) : 'n/a'} | ${ratio(two)} | ${ratio(twoFresh)} | ${seconds(figure('solveLdaSeconds'))} | ${seconds(figure('fitMomentsSeconds'))} |`);
  }
  return lines.join('\n');
}

function framesMarkdown(frames: FrameTimes[]): string {
  return [
    '**Panel: frame times of the discriminant scatter plot while panning and zooming** (headless Chromium, software rendering)',
    '',
    '| points | frames | p50 ms | p95 ms | max ms | first drawn s (includes the test harness handing the sample into the page) |',
    '|---:|---:|---:|---:|---:|---:|',
    ...frames.map((f) => `| ${f.points.toLocaleString('en')} | ${f.frames} | ${f.p50.toFixed(1)} | ${f.p95.toFixed(1)} | ${f.max.toFixed(1)} | ${f.firstDrawSeconds.toFixed(2)} |`),
  ].join('\n');
}

function editorMarkdown(all: EditorFigures[]): string {
  return [
    `**Editor (VS Code ${'1.100'} server build in headless Chromium)**: times are the median of ${all[0]?.runs ?? 1} run(s) per file, each in a fresh VS Code, the event-loop delay the worst run's; the provisional time runs from the open command, the extension's activation included, until the host posts the answer to the panel`,
    '',
    '| file | MB | provisional answer after s | rows in it | full fit s | host event-loop delay p99 ms | max ms |',
    '|---|---:|---:|---:|---:|---:|---:|',
    ...all.map((e) => `| ${e.table} | ${mb(e.bytes)} | ${e.provisionalSeconds.toFixed(2)} | ${e.provisionalRows.toLocaleString('en')} | ${e.fullSeconds.toFixed(1)} | ${e.eventLoopDelayP99Ms.toFixed(1)} | ${e.eventLoopDelayMaxMs.toFixed(1)} |`),
  ].join('\n');
}

function evaluateTargets(
  summaries: Map<string, Map<ToolId, Summary>>,
  tables: TableShape[],
  layouts: Map<string, ParquetLayout>,
  kernels: KernelPair[],
  frames: FrameTimes[],
  editor: EditorFigures[],
  quick: boolean,
): Target[] {
  const targets: Target[] = [];
  const note = quick ? ' (quick sizes: indicative only)' : '';
  const narrow = summaries.get('narrow');
  if (narrow) {
    const ours = narrow.get('scatterwise')!;
    const one = narrow.get('scatterwise-1');
    const notebook = narrow.get('notebook');
    if (notebook) {
      const speed = notebook.seconds / ours.seconds;
      targets.push({ what: `narrow CSV end to end at least 8× faster than pandas + scikit-learn${note}`, holds: speed >= 8, measured: `${speed.toFixed(1)}× (${ours.seconds.toFixed(1)} s vs ${notebook.seconds.toFixed(1)} s)` });
      const share = ours.maxRssMB / notebook.maxRssMB;
      targets.push({ what: 'narrow CSV peak memory under 10% of pandas + scikit-learn', holds: share < 0.1, measured: `${(100 * share).toFixed(1)}% (${ours.maxRssMB.toFixed(0)} MB vs ${notebook.maxRssMB.toFixed(0)} MB)` });
    } else targets.push({ what: 'narrow CSV at least 8× faster than pandas + scikit-learn, memory under 10% of theirs', holds: null, measured: 'Python with pandas and scikit-learn not installed' });
    const reader = narrow.get('reader');
    const csvParse = narrow.get('csv-parse');
    const floor = narrow.get('floor');
    if (reader && floor) targets.push({ what: `reader (one thread, into the moments) at least 50% of the floor's MB/s${note}`, holds: floor.seconds / reader.seconds >= 0.5, measured: `${(100 * floor.seconds / reader.seconds).toFixed(0)}% (${reader.seconds.toFixed(2)} s vs floor ${floor.seconds.toFixed(2)} s)` });
    if (reader && csvParse) targets.push({ what: `reader at least 4× csv-parse${note}`, holds: csvParse.seconds / reader.seconds >= 4, measured: `${(csvParse.seconds / reader.seconds).toFixed(1)}× (${reader.seconds.toFixed(2)} s vs ${csvParse.seconds.toFixed(2)} s)` });
    if (reader) targets.push({ what: 'reader peak memory under 200 MB', holds: reader.maxRssMB < 200, measured: `${reader.maxRssMB.toFixed(0)} MB` });
    targets.push({ what: 'narrow CSV peak memory under 200 MB', holds: ours.maxRssMB < 200, measured: `${ours.maxRssMB.toFixed(0)} MB` });
    if (one) {
      const speedup = one.seconds / ours.seconds;
      targets.push({ what: `both cores: at least 1.6× the single-worker speed${note}`, holds: speedup >= 1.6, measured: `${speedup.toFixed(2)}× by wall time (${one.seconds.toFixed(1)} s → ${ours.seconds.toFixed(1)} s; CPU ${one.cpuSeconds.toFixed(1)} s → ${ours.cpuSeconds.toFixed(1)} s)` });
    }
  }
  for (const k of kernels) {
    const ours = median(k.ours.map((r) => r.momentsSeconds));
    const two = median(k.ours.map((r) => r.twoThreadSeconds));
    const twoFresh = median(k.ours.map((r) => r.twoThreadFreshSeconds));
    const numpy = median(k.numpy);
    const engine = k.ours[0]?.simd ? 'WebAssembly SIMD' : 'JavaScript';
    if (Number.isFinite(numpy)) {
      targets.push({
        what: `d = ${k.d}: moments update within 3× of numpy's X.T @ X on the same rows, both on all cores, both steady${note}`,
        holds: two <= 3 * numpy,
        measured: `${(two / numpy).toFixed(2)}× (${two.toFixed(3)} s on two threads vs ${numpy.toFixed(3)} s; one thread ${ours.toFixed(3)} s, ${(ours / numpy).toFixed(1)}×; into a fresh accumulator ${twoFresh.toFixed(3)} s, ${(twoFresh / numpy).toFixed(1)}×; ${engine})`,
      });
    }
    const lda = median(k.ours.map((r) => r.solveLdaSeconds ?? NaN));
    if (Number.isFinite(lda)) targets.push({ what: `d = ${k.d}, K = 10: the fit from moments (solveLda) under 0.5 s`, holds: lda < 0.5, measured: `${lda.toFixed(3)} s; the whole fit from moments with PCA and tests ${median(k.ours.map((r) => r.fitMomentsSeconds ?? NaN)).toFixed(3)} s` });
  }
  const csv = summaries.get('narrow')?.get('scatterwise');
  for (const id of ['parquet', 'parquet-1'] as const) {
    const parquet = summaries.get(id)?.get('scatterwise');
    if (!parquet) continue;
    const table = tables.find((t) => t.id === id)!;
    if (csv) targets.push({ what: `${table.title}: at least the CSV's throughput`, holds: parquet.seconds <= csv.seconds, measured: `${parquet.seconds.toFixed(1)} s vs CSV ${csv.seconds.toFixed(1)} s` });
    const dictionaries = layouts.get(id)?.largestGroupDictionaryBytes ?? 0;
    // A group with dictionaries over the spill limit is read from a scratch file of doubles (src/core/read/parquetSpill.ts), its dictionaries not held.
    const held = dictionaries >= DEFAULT_SPILL_LIMITS.dictionaryBytes ? ` (the row group's dictionary pages ${(dictionaries / 1e6).toFixed(0)} MB, spilled to scratch files, not held)` : '';
    targets.push({ what: `${table.title}: bounded memory (peak under 200 MB)`, holds: parquet.maxRssMB < 200, measured: `${parquet.maxRssMB.toFixed(0)} MB${held}` });
  }
  for (const f of frames) targets.push({ what: `panel scatter plot at ${f.points.toLocaleString('en')} points: frame time p95 under 33 ms while panning and zooming`, holds: f.p95 < 33, measured: `p95 ${f.p95.toFixed(1)} ms over ${f.frames} frames` });
  for (const e of editor) {
    targets.push({ what: `editor, ${e.table}: provisional answer within 1 s of opening the file`, holds: e.provisionalSeconds < 1, measured: `${e.provisionalSeconds.toFixed(2)} s` });
    targets.push({ what: `editor, ${e.table}: host event-loop delay p99 under 50 ms during the full fit`, holds: e.eventLoopDelayP99Ms < 50, measured: `${e.eventLoopDelayP99Ms.toFixed(1)} ms` });
  }
  return targets;
}

main().catch((error: unknown) => {
  console.error(error);
  process.exit(1);
});
