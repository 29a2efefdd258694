// The scenario format: read, check, change (--set), resolve to SI units, derive numbers.

export * from './types.ts';
export { formatIssue, pathToString, ScenarioError, type ScenarioIssue } from './errors.ts';
export { parseScenarioText, type ParseResult, type TextPosition } from './parse.ts';
export {
  validateScenario,
  validateScenarioText,
  loadScenario,
  collectIssues,
  type ValidationResult,
  type ValidateOptions,
} from './validate.ts';
export { withDefaults } from './defaults.ts';
export { applyOverrides, parseOverride, type Override, type OverrideResult } from './overrides.ts';
export { resolveScenario, cellSize, EQUATORIAL_BETA, type ResolvedScenario } from './resolve.ts';
export {
  derivedNumbers,
  stabilityLimit,
  scenarioStability,
  maxCoriolis,
  type DerivedNumbers,
  type StabilityInput,
  type StabilityLimit,
  type LimitingTerm,
} from './derived.ts';
export { MAX_CELLS } from './semantic.ts';
