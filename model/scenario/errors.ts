// How problems with a scenario are reported: one issue per mistake, each with the JSON path of the
// value at fault and a message that says what was wrong and what is allowed.

import { InputError } from '../errors.ts';

export interface ScenarioIssue {
  /** JSON path of the value at fault, e.g. "physics.reducedGravity" or "wind.parts[2].envelope.ramp"; "" for the whole file. */
  path: string;
  /** One line: what is wrong and what is allowed. */
  message: string;
  /** File the issue is in, when known. */
  file?: string;
  /** 1-based position in the file text, when known. */
  line?: number;
  column?: number;
  /** A line about the list itself (it is incomplete), shown after the problems and not counted among them. */
  summary?: boolean;
}

export type PathSegment = string | number;

/** ["wind", "parts", 2, "envelope"] -> "wind.parts[2].envelope". */
export function pathToString(segments: readonly PathSegment[]): string {
  let out = '';
  for (const s of segments) {
    if (typeof s === 'number') out += `[${s}]`;
    else out += out === '' ? s : `.${s}`;
  }
  return out;
}

/** "file.json: line 3, column 7: physics.reducedGravity: must be > 0 ..." (parts that are unknown are left out). */
export function formatIssue(issue: ScenarioIssue): string {
  const parts: string[] = [];
  if (issue.file) parts.push(issue.file);
  if (issue.line !== undefined)
    parts.push(issue.column !== undefined ? `line ${issue.line}, column ${issue.column}` : `line ${issue.line}`);
  if (issue.path) parts.push(shortText(issue.path, 200));
  parts.push(issue.message);
  return clipLine(parts.join(': '));
}

/** A name or path of a message, cut in the middle when longer than `max` characters (a hostile key can be megabytes). */
export function shortText(text: string, max = 60): string {
  if (text.length <= max) return text;
  const keep = Math.floor((max - 5) / 2);
  return `${text.slice(0, keep)} ... ${text.slice(-keep)} (${text.length.toLocaleString('en-US')} characters)`;
}

/** Problem lines shown for one scenario, in the page and on the command line alike; then a count. */
export const MAX_ISSUE_LINES = 20;
/** Longest message line, characters: a 40,000-character key or path is cut, not shown whole. */
export const MAX_LINE_CHARS = 4000;

/** A line of at most MAX_LINE_CHARS characters, saying how much was cut. */
export function clipLine(line: string): string {
  if (line.length <= MAX_LINE_CHARS) return line;
  const keep = MAX_LINE_CHARS - 80;
  return `${line.slice(0, keep)} ... (${(line.length - keep).toLocaleString('en-US')} more characters not shown)`;
}

/**
 * The lines a list of problems is shown as, wherever it is shown (pycno check and run, the page's
 * message area, the wind designer): the first MAX_ISSUE_LINES, one per problem, and a count of
 * the rest. Only the lines shown are formatted.
 */
export function issueListLines(all: readonly ScenarioIssue[]): string[] {
  const issues = all.filter((i) => !i.summary);
  const lines = issues.slice(0, MAX_ISSUE_LINES).map(formatIssue);
  if (issues.length > MAX_ISSUE_LINES)
    lines.push(
      `... and ${(issues.length - MAX_ISSUE_LINES).toLocaleString('en-US')} more problems (${issues.length.toLocaleString('en-US')} in all); fix the first ones and check again`,
    );
  for (const i of all) if (i.summary) lines.push(clipLine(i.message));
  return lines;
}

/** Thrown by the loaders that cannot return a result object; carries every issue, shows the first ones. */
export class ScenarioError extends InputError {
  override name = 'ScenarioError';
  readonly issues: ScenarioIssue[];
  constructor(issues: ScenarioIssue[]) {
    const lines = issueListLines(issues);
    super(issues.length === 1 ? lines[0] : `${issues.length} problems in the scenario:\n  ${lines.join('\n  ')}`);
    this.issues = issues;
  }
}

/** Show a value in a message: strings quoted, long values shortened. */
export function show(value: unknown): string {
  if (value === undefined) return 'nothing';
  let s: string;
  if (typeof value === 'string') s = JSON.stringify(value);
  else if (typeof value === 'number') s = String(value);
  else s = JSON.stringify(value) ?? String(value);
  return s.length > 60 ? `${s.slice(0, 57)}...` : s;
}

/** The JSON type of a value as a user would name it. */
export function jsonType(value: unknown): string {
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'array';
  if (typeof value === 'number') return Number.isInteger(value) ? 'integer' : 'number';
  return typeof value;
}
