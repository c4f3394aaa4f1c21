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

/** The `--fail-on` spellings, for help and messages. */
export const FAIL_ON_FORMS = ['min-accuracy=FRACTION|N%', 'accuracy-drop=FRACTION|N%', 'new-finding=info|warning|error', 'class-lost', 'none'] as const;

/** `0.9` or `90%` → 0.9; null when it is not a number in [0, 1]. */
function fraction(text: string): number | null {
  const percent = /^(\d+(?:\.\d+)?)%$/.exec(text);
  const value = percent ? Number(percent[1]) / 100 : /^(\d+(?:\.\d+)?|\.\d+)$/.test(text) ? Number(text) : NaN;
  return Number.isFinite(value) && value >= 0 && value <= 1 ? value : null;
}

/**
 * Reads `--fail-on` values (each may hold several rules separated by commas) into gate rules.
 * Returns the rules, or the first problem in words. `none` means: no gate at all.
 */
export function parseFailOn(values: readonly string[]): { rules: GateRules } | { problem: string } {
  const rules: GateRules = {};
  const seen = new Set<string>();
  for (const item of values.flatMap((v) => v.split(',')).map((s) => s.trim()).filter(Boolean)) {
    const [name, value] = item.includes('=') ? [item.slice(0, item.indexOf('=')), item.slice(item.indexOf('=') + 1)] : [item, undefined];
    if (seen.has(name)) return { problem: `the rule '${name}' is given twice` };
    seen.add(name);
    switch (name) {
      case 'min-accuracy':
      case 'accuracy-drop': {
        const parsed = value === undefined ? null : fraction(value);
        if (parsed === null) return { problem: `'${item}' needs a fraction from 0 to 1 or a percentage, e.g. ${name}=${name === 'min-accuracy' ? '0.9 or 90%' : '0.02 or 2%'}` };
        if (name === 'min-accuracy') rules.minAccuracy = parsed;
        else rules.maxAccuracyDrop = parsed;
        break;
      }
      case 'new-finding':
        if (!SEVERITIES.includes(value as Severity)) return { problem: `'${item}' needs a severity: new-finding=info, new-finding=warning or new-finding=error` };
        rules.newFindingAtOrAbove = value as Severity;
        break;
      case 'class-lost':
        if (value !== undefined) return { problem: "'class-lost' takes no value" };
        rules.classDisappears = true;
        break;
      case 'none':
        if (value !== undefined) return { problem: "'none' takes no value" };
        break;
      default:
        return { problem: `unknown rule '${name}' (rules: ${FAIL_ON_FORMS.join(', ')})` };
    }
  }
  if (seen.has('none')) {
    if (seen.size > 1) return { problem: "'none' cannot be combined with other rules" };
    // An explicit rule set with nothing to check: no gate fails.
    return { rules: { classDisappears: false } };
  }
  return { rules };
}
