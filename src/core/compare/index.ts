/** Comparing two fits of a data file: deltas, notable changes in words, gates, and their renderings. */
export { alignedAxisSigns, sharedRange } from './alignAxes';
export { addedFile, compareFile, comparisonSet, removedFile } from './comparison';
export type { ComparisonSet, CompareInput, FileComparison, SideSummary } from './comparison';
export { accuracyNoise, compareReports, findingKey } from './deltas';
export type { Change, ClassCountChange, OptionalChange, RecallChange, ReportDeltas } from './deltas';
export { classRows, figureRows } from './figures';
export type { ClassRow, FigureRow } from './figures';
export { DEFAULT_GATE_RULES, effectiveRules, FAIL_ON_FORMS, hasAnyRule, parseFailOn, SEVERITIES, severityRank } from './gateRules';
export type { GateRules } from './gateRules';
export { checkGateFacts, checkGates, checkNewFileGates, checkRemovedFileGates, gateFacts, ruleText } from './gates';
export type { GateFacts, GateOutcome, GateVerdict } from './gates';
export { comparisonToMarkdown } from './markdown';
export { notableChanges } from './reasons';
export type { NotableChange } from './reasons';
export { comparisonToJson, comparisonToText } from './text';
