/**
 * The gates a comparison can check, as the config (`gates`) and the CLI (`--fail-on`) spell them.
 * With no rule given at all, the defaults apply: a class disappearing fails, and so does a new
 * finding of severity `error`. Once any rule is given, only the rules given apply.
 */
import type { Severity } from '../types';

export const SEVERITIES: readonly Severity[] = ['info', 'warning', 'error'];

export interface GateRules {
  /** Fail when the head's cross-validated accuracy is below this fraction. */
  minAccuracy?: number;
  /** Fail when the cross-validated accuracy falls by more than this fraction (of 1) against the base. */
  maxAccuracyDrop?: number;
  /** Fail on a finding in the head, absent from the base, of this severity or worse. */
  newFindingAtOrAbove?: Severity;
  /** Fail when a class of the base has no rows in the head. */
  classDisappears?: boolean;
}

export const DEFAULT_GATE_RULES: Readonly<GateRules> = { classDisappears: true, newFindingAtOrAbove: 'error' };

/** Whether any rule is set (an explicit `classDisappears: false` counts: it switches the default off). */
export function hasAnyRule(rules: GateRules | undefined): rules is GateRules {
  return rules !== undefined && Object.values(rules).some((value) => value !== undefined);
}

/** The rules in force: the first set that has any rule, else the defaults. */
export function effectiveRules(...candidates: (GateRules | undefined)[]): { rules: GateRules; defaults: boolean } {
  for (const candidate of candidates) if (hasAnyRule(candidate)) return { rules: { ...candidate }, defaults: false };
  return { rules: { ...DEFAULT_GATE_RULES }, defaults: true };
}

/** Severity rank: info 0, warning 1, error 2. */
export function severityRank(severity: Severity): number {
  return SEVERITIES.indexOf(severity);
}
