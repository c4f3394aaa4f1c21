/**
 * Checking the gates of a comparison: each rule in force passes or fails, and says by how much.
 * A gate that cannot be checked (no cross-validated accuracy on a side it needs) fails, since a
 * gate that silently passes would let the change through unexamined.
 */
import { formatCount, formatPercent } from '../format/numbers';
import type { Finding, FitReport } from '../types';
import type { ReportDeltas } from './deltas';
import { effectiveRules, severityRank, type GateRules } from './gateRules';

export interface GateOutcome {
  /** The rule as the CLI spells it: `min-accuracy=0.9`, `accuracy-drop=0.02`, `new-finding=warning`, `class-lost`. */
  rule: string;
  passed: boolean;
  /** What was measured, and by how much it missed when it failed. */
  detail: string;
}

export interface GateVerdict {
  outcomes: GateOutcome[];
  passed: boolean;
  /** Whether the default rules were used (no rule was given). */
  defaults: boolean;
}

function points(fraction: number): string {
  return `${(fraction * 100).toFixed(1)} points`;
}

/** The CLI spelling of each rule, shared by `--fail-on` parsing and the report. */
export function ruleText(rules: GateRules): string[] {
  const out: string[] = [];
  if (rules.minAccuracy !== undefined) out.push(`min-accuracy=${rules.minAccuracy}`);
  if (rules.maxAccuracyDrop !== undefined) out.push(`accuracy-drop=${rules.maxAccuracyDrop}`);
  if (rules.newFindingAtOrAbove !== undefined) out.push(`new-finding=${rules.newFindingAtOrAbove}`);
  if (rules.classDisappears) out.push('class-lost');
  return out;
}

/** What the gates look at; built from the deltas, or from one side for an added or removed file. */
export interface GateFacts {
  headName: string;
  /** Cross-validated accuracy on each side (null where missing). */
  crossValidated: { base: number | null; head: number | null };
  /** Findings of the head that the base did not have. */
  newFindings: readonly Finding[];
  /** Classes of the base with no rows in the head. */
  lostClasses: readonly { label: string; base: number }[];
}

export function gateFacts(deltas: ReportDeltas): GateFacts {
  const cv = deltas.accuracy.crossValidated;
  return {
    headName: deltas.headName,
    crossValidated: { base: cv?.base ?? null, head: cv?.head ?? null },
    newFindings: deltas.findings.added,
    lostClasses: deltas.classes.lost,
  };
}

/**
 * Checks the facts against the first rule set that has a rule (e.g. the command line's, then the
 * config's), else against the defaults. `applicable` leaves out rules that cannot apply (the
 * accuracy drop of a file that has no base).
 */
export function checkGateFacts(facts: GateFacts, ruleSets: readonly (GateRules | undefined)[], applicable: readonly (keyof GateRules)[] = ['minAccuracy', 'maxAccuracyDrop', 'newFindingAtOrAbove', 'classDisappears']): GateVerdict {
  const { rules: all, defaults } = effectiveRules(...ruleSets);
  const rules: GateRules = {};
  for (const key of applicable) (rules as Record<string, unknown>)[key] = all[key];
  const outcomes: GateOutcome[] = [];
  const { base, head } = facts.crossValidated;

  if (rules.minAccuracy !== undefined) {
    const rule = `min-accuracy=${rules.minAccuracy}`;
    if (head === null) outcomes.push({ rule, passed: false, detail: `${facts.headName} has no cross-validated accuracy to check (cross-validation was off or skipped)` });
    else if (head < rules.minAccuracy) {
      outcomes.push({ rule, passed: false, detail: `cross-validated accuracy ${formatPercent(head)} is ${points(rules.minAccuracy - head)} below the minimum ${formatPercent(rules.minAccuracy)}` });
    } else outcomes.push({ rule, passed: true, detail: `cross-validated accuracy ${formatPercent(head)} ≥ ${formatPercent(rules.minAccuracy)}` });
  }

  if (rules.maxAccuracyDrop !== undefined) {
    const rule = `accuracy-drop=${rules.maxAccuracyDrop}`;
    if (base === null || head === null) {
      outcomes.push({ rule, passed: false, detail: 'a cross-validated accuracy is missing on one side, so the drop cannot be measured' });
    } else if (base - head > rules.maxAccuracyDrop) {
      outcomes.push({
        rule,
        passed: false,
        detail: `cross-validated accuracy fell ${points(base - head)} (${formatPercent(base)} → ${formatPercent(head)}), ${points(base - head - rules.maxAccuracyDrop)} more than the ${points(rules.maxAccuracyDrop)} allowed`,
      });
    } else {
      outcomes.push({ rule, passed: true, detail: `cross-validated accuracy ${formatPercent(base)} → ${formatPercent(head)}, within the ${points(rules.maxAccuracyDrop)} allowed` });
    }
  }

  if (rules.newFindingAtOrAbove !== undefined) {
    const rule = `new-finding=${rules.newFindingAtOrAbove}`;
    const threshold = severityRank(rules.newFindingAtOrAbove);
    const offending = facts.newFindings.filter((f) => severityRank(f.severity) >= threshold);
    outcomes.push(
      offending.length > 0
        ? {
            rule,
            passed: false,
            detail: `${formatCount(offending.length)} new finding${offending.length > 1 ? 's' : ''} at ${rules.newFindingAtOrAbove} or worse: ${offending.map((f) => `${f.severity} ${f.code}${f.columns?.length ? ` (${f.columns.slice(0, 3).join(', ')})` : ''}`).join('; ')}`,
          }
        : { rule, passed: true, detail: `no new finding at ${rules.newFindingAtOrAbove} or worse` },
    );
  }

  if (rules.classDisappears) {
    const lost = facts.lostClasses;
    outcomes.push(
      lost.length > 0
        ? { rule: 'class-lost', passed: false, detail: `${lost.map((c) => `'${c.label}' (${formatCount(c.base)} rows in the base)`).join(', ')} ${lost.length > 1 ? 'have' : 'has'} no rows now` }
        : { rule: 'class-lost', passed: true, detail: 'every class of the base still has rows' },
    );
  }

  return { outcomes, passed: outcomes.every((o) => o.passed), defaults };
}

/** Checks two fits' deltas against the first rule set that has a rule, else the defaults. */
export function checkGates(deltas: ReportDeltas, ...ruleSets: (GateRules | undefined)[]): GateVerdict {
  return checkGateFacts(gateFacts(deltas), ruleSets);
}

/** Gates of a data file that only the head has: min-accuracy and new findings (all its findings are new). */
export function checkNewFileGates(head: FitReport, ...ruleSets: (GateRules | undefined)[]): GateVerdict {
  const facts: GateFacts = { headName: head.source.name, crossValidated: { base: null, head: head.accuracy.crossValidated?.value ?? null }, newFindings: head.findings, lostClasses: [] };
  return checkGateFacts(facts, ruleSets, ['minAccuracy', 'newFindingAtOrAbove']);
}

/** Gates of a data file the head removed: only class-lost applies, and every class is lost. */
export function checkRemovedFileGates(base: FitReport, ...ruleSets: (GateRules | undefined)[]): GateVerdict {
  const facts: GateFacts = {
    headName: '(removed)',
    crossValidated: { base: base.accuracy.crossValidated?.value ?? null, head: null },
    newFindings: [],
    lostClasses: base.classes.map((c) => ({ label: c.label, base: c.count })),
  };
  return checkGateFacts(facts, ruleSets, ['classDisappears']);
}
