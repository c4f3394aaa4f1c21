/**
 * The notable changes between two fits, each in one plain sentence that says what changed, by how
 * much, and the likely reason, most important first. What counts as notable:
 *
 * - any class lost or gained, a changed label column, columns or features added or removed, any
 *   change in the rows, a changed fit option (all of them facts a reviewer must see);
 * - an accuracy or per-class recall change larger than twice its rough binomial noise
 *   (deltas.ts `accuracyNoise`) and at least half a percentage point; smaller ones are "within noise";
 * - a change in how many discriminants matter (Bartlett p < 0.05); a discriminant whose share of
 *   the separation moved by 5 points or more, or whose eigenvalue changed by a quarter or more
 *   (thresholds of our own choosing: common practice, no source);
 * - each new or resolved finding.
 */
import { formatCount, formatNumber, formatPercent, listNames } from '../format/numbers';
import { describeCvMethod } from '../format/verdict';
import type { Finding } from '../types';
import { accuracyNoise, type ReportDeltas } from './deltas';

export interface NotableChange {
  /** A stable name of what changed, for tools and tests (`class-lost`, `accuracy`, …). */
  topic: string;
  /** Higher first; ties keep the order below. */
  importance: number;
  text: string;
}

/** Least change in an accuracy (as a fraction) worth a sentence, however many rows. */
export const MIN_ACCURACY_CHANGE = 0.005;
/** How many noise units a change must exceed to be "beyond sampling noise". */
export const NOISE_MULTIPLE = 2;
/** A discriminant's share of the separation moving by this much (absolute) is notable. */
export const EXPLAINED_SHIFT = 0.05;
/** A discriminant's eigenvalue changing by this fraction of the base value is notable. */
export const EIGENVALUE_SHIFT = 0.25;

function signed(delta: number, format: (x: number) => string): string {
  if (delta === 0) return '±0';
  return `${delta > 0 ? '+' : '−'}${format(Math.abs(delta))}`;
}

function points(delta: number): string {
  return `${signed(delta * 100, (x) => x.toFixed(1))} points`;
}

function quoted(names: readonly string[]): string {
  return listNames(names, 6);
}

function rose(delta: number): string {
  return delta > 0 ? 'rose' : 'fell';
}

/** Which new findings name a column. */
function newFindingsOn(deltas: ReportDeltas, code: string): Finding[] {
  return deltas.findings.added.filter((f) => f.code === code);
}

/** Likely reasons for a change in accuracy, strongest first. */
function accuracyReasons(deltas: ReportDeltas, delta: number): string[] {
  const reasons: string[] = [];
  const leaks = newFindingsOn(deltas, 'possible-leakage');
  const added = new Set(deltas.features.added);
  const newLeakColumns = leaks.flatMap((f) => f.columns ?? []).filter((c) => added.has(c));
  const oldLeakColumns = leaks.flatMap((f) => f.columns ?? []).filter((c) => !added.has(c));
  if (delta > 0 && newLeakColumns.length > 0) {
    reasons.push(`the new column${newLeakColumns.length > 1 ? 's' : ''} ${quoted(newLeakColumns)} alone separate${newLeakColumns.length > 1 ? '' : 's'} the classes almost perfectly (possible leakage: check that ${newLeakColumns.length > 1 ? 'they are' : 'it is'} not recorded after, or derived from, the label)`);
  }
  if (delta > 0 && oldLeakColumns.length > 0) reasons.push(`${quoted(oldLeakColumns)} now separate${oldLeakColumns.length > 1 ? '' : 's'} the classes almost perfectly (possible leakage)`);
  const otherAdded = deltas.features.added.filter((c) => !newLeakColumns.includes(c));
  if (otherAdded.length > 0) reasons.push(`feature${otherAdded.length > 1 ? 's' : ''} ${quoted(otherAdded)} ${otherAdded.length > 1 ? 'were' : 'was'} added`);
  if (deltas.features.removed.length > 0) reasons.push(`feature${deltas.features.removed.length > 1 ? 's' : ''} ${quoted(deltas.features.removed)} ${deltas.features.removed.length > 1 ? 'are' : 'is'} no longer used`);
  if (deltas.classes.lost.length > 0 || deltas.classes.gained.length > 0) reasons.push('the classes changed');
  const used = deltas.rows.used;
  if (used.base > 0 && Math.abs(used.delta) / used.base >= 0.05) reasons.push(`${formatPercent(Math.abs(used.delta) / used.base)} ${used.delta > 0 ? 'more' : 'fewer'} rows were used`);
  const cvOption = deltas.options.find((o) => o.name === 'cross-validation');
  if (cvOption) reasons.push(`the cross-validation changed (${cvOption.base} → ${cvOption.head})`);
  const others = deltas.options.filter((o) => o.name !== 'cross-validation');
  if (others.length > 0) reasons.push(`the fit options changed (${others.map((o) => `${o.name} ${o.base} → ${o.head}`).join(', ')})`);
  if (reasons.length === 0) reasons.push('the features, classes and options are the same, so the values in the rows changed');
  return reasons;
}

function classSentences(deltas: ReportDeltas): NotableChange[] {
  const out: NotableChange[] = [];
  const gained = [...deltas.classes.gained];
  for (const lost of deltas.classes.lost) {
    // The same number of rows under a new name is most likely a relabelling.
    const twin = gained.findIndex((g) => g.head === lost.base);
    if (twin >= 0) {
      const renamed = gained.splice(twin, 1)[0]!;
      out.push({
        topic: 'class-lost',
        importance: 100,
        text: `Class '${lost.label}' (${formatCount(lost.base)} rows in the base) has no rows now, and class '${renamed.label}' appeared with the same ${formatCount(renamed.head)} rows: '${lost.label}' was probably relabelled '${renamed.label}'.`,
      });
    } else {
      out.push({ topic: 'class-lost', importance: 100, text: `Class '${lost.label}' (${formatCount(lost.base)} rows in the base) has no rows now: its rows were removed or relabelled.` });
    }
  }
  for (const g of gained) out.push({ topic: 'class-gained', importance: 90, text: `Class '${g.label}' is new, with ${formatCount(g.head)} rows.` });
  return out;
}

function rowSentence(deltas: ReportDeltas): NotableChange | null {
  const { total, used } = deltas.rows;
  if (total.delta === 0 && used.delta === 0) return null;
  const byClass = deltas.classes.kept
    .map((c) => ({ label: c.label, delta: c.head - c.base }))
    .filter((c) => c.delta !== 0)
    .sort((a, b) => Math.abs(b.delta) - Math.abs(a.delta));
  const share = used.base > 0 ? Math.abs(used.delta) / used.base : 1;
  const perClass = byClass.length > 0 ? `; by class: ${byClass.slice(0, 5).map((c) => `'${c.label}' ${signed(c.delta, formatCount)}`).join(', ')}${byClass.length > 5 ? ', …' : ''}` : '';
  const dropped = deltas.rows.dropped.delta !== 0 ? ` Rows dropped for missing or bad values: ${formatCount(deltas.rows.dropped.base)} → ${formatCount(deltas.rows.dropped.head)}.` : '';
  const verb = used.delta === 0 ? 'stayed at' : used.delta > 0 ? 'rose from' : 'fell from';
  const usedText = used.delta === 0 ? `${verb} ${formatCount(used.head)}` : `${verb} ${formatCount(used.base)} to ${formatCount(used.head)} (${signed(used.delta, formatCount)}, ${signed(share * 100 * Math.sign(used.delta), (x) => `${x.toFixed(1)}%`)})`;
  return {
    topic: 'rows',
    importance: share >= 0.1 ? 72 : 65,
    text: `Rows used ${usedText}${perClass}.${total.delta !== used.delta ? ` Rows in the file: ${formatCount(total.base)} → ${formatCount(total.head)}.` : ''}${dropped}`,
  };
}

function columnSentences(deltas: ReportDeltas): NotableChange[] {
  const out: NotableChange[] = [];
  if (deltas.label.base !== deltas.label.head) {
    out.push({ topic: 'label', importance: 95, text: `The label column changed from '${deltas.label.base}' to '${deltas.label.head}', so the two fits answer different questions.` });
  }
  const featureSet = new Set([...deltas.features.added, ...deltas.features.removed]);
  if (deltas.features.added.length > 0) {
    out.push({ topic: 'features-added', importance: 75, text: `Feature${deltas.features.added.length > 1 ? 's' : ''} added: ${quoted(deltas.features.added)}.` });
  }
  if (deltas.features.removed.length > 0) {
    out.push({ topic: 'features-removed', importance: 75, text: `Feature${deltas.features.removed.length > 1 ? 's' : ''} no longer used: ${quoted(deltas.features.removed)}.` });
  }
  if (deltas.columns) {
    const added = deltas.columns.added.filter((c) => !featureSet.has(c));
    const removed = deltas.columns.removed.filter((c) => !featureSet.has(c));
    if (added.length > 0) out.push({ topic: 'columns-added', importance: 60, text: `Column${added.length > 1 ? 's' : ''} added but not used as features: ${quoted(added)}.` });
    if (removed.length > 0) out.push({ topic: 'columns-removed', importance: 60, text: `Column${removed.length > 1 ? 's' : ''} removed that were not features: ${quoted(removed)}.` });
  }
  return out;
}

/** Why one class's recall may have moved: the features, its own rows, or the balance of the others. */
function recallReason(deltas: ReportDeltas, label: string): string {
  const reasons: string[] = [];
  const features = [
    ...(deltas.features.added.length > 0 ? [`${quoted(deltas.features.added)} added`] : []),
    ...(deltas.features.removed.length > 0 ? [`${quoted(deltas.features.removed)} no longer used`] : []),
  ];
  if (features.length > 0) reasons.push(`the features changed (${features.join('; ')})`);
  const changed = (c: { base: number; head: number }): boolean => c.base > 0 && Math.abs(c.head - c.base) / c.base >= 0.05;
  const own = deltas.classes.kept.find((c) => c.label === label);
  if (own && changed(own)) {
    reasons.push(`its rows went from ${formatCount(own.base)} to ${formatCount(own.head)}${deltas.priors === 'empirical' ? ' (with empirical priors a class that shrinks is predicted less often, one that grows more often)' : ''}`);
  }
  const others = [
    ...deltas.classes.kept.filter((c) => c.label !== label && changed(c)).map((c) => `'${c.label}' ${formatCount(c.base)} → ${formatCount(c.head)} rows`),
    ...deltas.classes.lost.map((c) => `'${c.label}' lost`),
    ...deltas.classes.gained.map((c) => `'${c.label}' new`),
  ];
  if (others.length > 0) reasons.push(`the other classes changed (${others.join(', ')})`);
  return reasons.length > 0 ? `: ${reasons.join('; ')}` : '';
}

function accuracySentences(deltas: ReportDeltas): NotableChange[] {
  const out: NotableChange[] = [];
  const cv = deltas.accuracy.crossValidated;
  const rows = deltas.accuracy.rows;
  if (cv && cv.base !== null && cv.head !== null && cv.delta !== null) {
    const noise = accuracyNoise(cv.base, cv.head, rows.base, rows.head);
    const method = cv.baseMethod === cv.headMethod ? `, ${describeCvMethod(cv.headMethod ?? '')}` : '';
    const noiseText = `about ±${(noise * 100).toFixed(1)} points`;
    if (Math.abs(cv.delta) >= Math.max(MIN_ACCURACY_CHANGE, NOISE_MULTIPLE * noise)) {
      out.push({
        topic: 'accuracy',
        importance: 85,
        text: `Cross-validated accuracy ${rose(cv.delta)} from ${formatPercent(cv.base)} to ${formatPercent(cv.head)} (${points(cv.delta)}${method}; sampling noise ${noiseText}): ${accuracyReasons(deltas, cv.delta).join('; ')}.`,
      });
    } else if (cv.delta !== 0) {
      out.push({ topic: 'accuracy', importance: 20, text: `Cross-validated accuracy ${formatPercent(cv.base)} → ${formatPercent(cv.head)} (${points(cv.delta)}${method}), within the sampling noise of ${noiseText}.` });
    }
  } else if (cv) {
    out.push({
      topic: 'accuracy',
      importance: 80,
      text: cv.head === null ? `The head was not cross-validated (the base had ${formatPercent(cv.base ?? NaN)}); see its cv-skipped finding.` : `The base was not cross-validated; the head has ${formatPercent(cv.head)}.`,
    });
  }
  if (!cv || cv.base === null || cv.head === null) {
    const training = deltas.accuracy.training;
    const noise = accuracyNoise(training.base, training.head, rows.base, rows.head);
    if (Math.abs(training.delta) >= Math.max(MIN_ACCURACY_CHANGE, NOISE_MULTIPLE * noise)) {
      out.push({
        topic: 'training-accuracy',
        importance: 70,
        text: `Training accuracy ${rose(training.delta)} from ${formatPercent(training.base)} to ${formatPercent(training.head)} (${points(training.delta)}): ${accuracyReasons(deltas, training.delta).join('; ')}.`,
      });
    }
  }
  const counts = new Map(deltas.classes.kept.map((c) => [c.label, c]));
  for (const recall of deltas.perClassRecall) {
    const n = counts.get(recall.label);
    if (!n || recall.base === null || recall.head === null || recall.delta === null || !Number.isFinite(recall.delta)) continue;
    const noise = accuracyNoise(recall.base, recall.head, n.base, n.head);
    if (Math.abs(recall.delta) < Math.max(MIN_ACCURACY_CHANGE, NOISE_MULTIPLE * noise)) continue;
    out.push({
      topic: 'recall',
      importance: 60,
      text: `${recall.kind === 'cross-validated' ? 'Cross-validated recall' : 'Recall'} of '${recall.label}' ${rose(recall.delta)} from ${formatPercent(recall.base)} to ${formatPercent(recall.head)} (${points(recall.delta)})${recallReason(deltas, recall.label)}.`,
    });
  }
  return out;
}

function discriminantSentences(deltas: ReportDeltas): NotableChange[] {
  const out: NotableChange[] = [];
  const significant = deltas.significantDiscriminants;
  if (significant.delta !== 0) {
    out.push({ topic: 'discriminants', importance: 55, text: `Discriminants that matter (Bartlett p < 0.05): ${significant.base} → ${significant.head}.` });
  }
  for (const d of deltas.discriminants) {
    const name = `LD${d.index + 1}`;
    const { eigenvalue, explainedRatio } = d;
    if (eigenvalue.base === null || eigenvalue.head === null) {
      out.push({
        topic: 'discriminants',
        importance: 50,
        text: eigenvalue.head === null ? `${name} no longer exists (eigenvalue ${formatNumber(eigenvalue.base ?? NaN)} in the base).` : `${name} is new, with eigenvalue ${formatNumber(eigenvalue.head)} (${formatPercent(explainedRatio.head ?? NaN)} of the separation).`,
      });
      continue;
    }
    const relative = eigenvalue.base > 0 ? Math.abs(eigenvalue.head - eigenvalue.base) / eigenvalue.base : eigenvalue.head > 0 ? Infinity : 0;
    const shift = Math.abs(explainedRatio.delta ?? 0);
    if (relative < EIGENVALUE_SHIFT && shift < EXPLAINED_SHIFT) continue;
    out.push({
      topic: 'discriminants',
      importance: 50,
      text: `${name}'s eigenvalue ${rose(eigenvalue.head - eigenvalue.base)} from ${formatNumber(eigenvalue.base)} to ${formatNumber(eigenvalue.head)}; its share of the separation ${formatPercent(explainedRatio.base ?? NaN)} → ${formatPercent(explainedRatio.head ?? NaN)}.`,
    });
  }
  return out;
}

/** The first sentence of a finding's message (the rest is in the findings list). */
function firstSentence(message: string): string {
  const end = message.search(/[.!?](\s|$)/);
  return end < 0 ? message : message.slice(0, end + 1);
}

const FINDING_IMPORTANCE = { error: 80, warning: 45, info: 30 } as const;

function findingSentences(deltas: ReportDeltas): NotableChange[] {
  const out: NotableChange[] = [];
  for (const f of deltas.findings.added) {
    const about = f.columns?.length ? ` about ${quoted(f.columns)}` : f.rows?.length ? ` about ${formatCount(f.rows.length)} row${f.rows.length > 1 ? 's' : ''}` : '';
    out.push({ topic: 'finding-new', importance: FINDING_IMPORTANCE[f.severity], text: `New ${f.severity} finding ${f.code}${about}: ${firstSentence(f.message)}` });
  }
  for (const f of deltas.findings.resolved) {
    out.push({ topic: 'finding-resolved', importance: FINDING_IMPORTANCE[f.severity] - 5, text: `Resolved ${f.severity} ${f.code}${f.columns?.length ? ` (${quoted(f.columns)})` : ''}: no longer found.` });
  }
  return out;
}

function optionSentences(deltas: ReportDeltas): NotableChange[] {
  return deltas.options.length === 0
    ? []
    : [{ topic: 'options', importance: 40, text: `Fit options differ: ${deltas.options.map((o) => `${o.name} ${o.base} → ${o.head}`).join('; ')}.` }];
}

/** Every notable change, most important first. */
export function notableChanges(deltas: ReportDeltas): NotableChange[] {
  const all = [
    ...classSentences(deltas),
    ...columnSentences(deltas),
    ...accuracySentences(deltas),
    ...(rowSentence(deltas) ? [rowSentence(deltas)!] : []),
    ...discriminantSentences(deltas),
    ...findingSentences(deltas),
    ...optionSentences(deltas),
  ];
  return all.map((change, order) => ({ change, order })).sort((a, b) => b.change.importance - a.change.importance || a.order - b.order).map(({ change }) => change);
}
