/**
 * The one-line verdict printed at the end of `npm test`: each step's outcome, then the totals,
 * e.g. `orderly tests: typecheck ok, lint ok, unit 120 passed, api 40 passed, e2e 3 passed —
 * 163 passed, 0 failed (84 s)`. Pure functions; the command-line wrapper is
 * scripts/summarize-tests.ts.
 */

/** Test counts read from one vitest JSON report. */
export interface VitestCounts {
  passed: number;
  failed: number;
  /** Skipped and todo tests together. */
  skipped: number;
  /** Test files that failed as a whole (e.g. an import threw), which hold no failed test. */
  failedFiles: number;
}

/** What one step of the test run did. */
export interface StepOutcome {
  /** Short name shown in the line: typecheck, lint, unit, api, build, e2e. */
  name: string;
  /** `check` steps report ok/FAILED; `tests` steps report counts from their vitest report. */
  kind: 'check' | 'tests';
  /** The step's exit code, or null when the step was not run (an earlier step it needs failed). */
  exitCode: number | null;
  /** Counts for `tests` steps; null when the report is missing or unreadable. */
  counts?: VitestCounts | null;
}

/** The summary line and whether the whole run passed. */
export interface Summary {
  line: string;
  ok: boolean;
}

function numberField(json: Record<string, unknown>, key: string): number {
  const value = json[key];
  return typeof value === 'number' && Number.isFinite(value) ? value : 0;
}

/**
 * Reads the counts from a vitest `--reporter=json` report (the Jest-compatible shape:
 * numPassedTests, numFailedTests, numPendingTests, numTodoTests, testResults[].status).
 * Returns null when the value is not such a report.
 */
export function countsFromVitestJson(json: unknown): VitestCounts | null {
  if (typeof json !== 'object' || json === null || !('numTotalTests' in json)) return null;
  const report = json as Record<string, unknown>;
  const files = Array.isArray(report.testResults) ? (report.testResults as unknown[]) : [];
  // A file that failed while none of its tests failed did not load or broke in a hook.
  const failedFiles = files.filter((file) => {
    if (typeof file !== 'object' || file === null) return false;
    const { status, assertionResults } = file as { status?: unknown; assertionResults?: unknown };
    const tests = Array.isArray(assertionResults) ? (assertionResults as Array<{ status?: unknown }>) : [];
    return status === 'failed' && !tests.some((test) => test.status === 'failed');
  }).length;
  return {
    passed: numberField(report, 'numPassedTests'),
    failed: numberField(report, 'numFailedTests'),
    skipped: numberField(report, 'numPendingTests') + numberField(report, 'numTodoTests'),
    failedFiles,
  };
}

function plural(count: number, one: string, many: string): string {
  return `${count} ${count === 1 ? one : many}`;
}

function describeStep(step: StepOutcome): { text: string; ok: boolean } {
  if (step.exitCode === null) return { text: `${step.name} not run`, ok: false };
  if (step.kind === 'check') {
    return step.exitCode === 0 ? { text: `${step.name} ok`, ok: true } : { text: `${step.name} FAILED`, ok: false };
  }
  const counts = step.counts;
  if (!counts) return { text: `${step.name} FAILED (no report, exit ${step.exitCode})`, ok: false };
  const parts: string[] = [];
  const total = counts.passed + counts.failed + counts.skipped;
  if (total === 0 && counts.failedFiles === 0) parts.push('no tests');
  else parts.push(`${counts.passed} passed`);
  if (counts.failed > 0) parts.push(`${counts.failed} failed`);
  if (counts.skipped > 0) parts.push(`${counts.skipped} skipped`);
  if (counts.failedFiles > 0) parts.push(`${plural(counts.failedFiles, 'file', 'files')} broken`);
  const ok = step.exitCode === 0 && counts.failed === 0 && counts.failedFiles === 0;
  // A non-zero exit with nothing failed in the report (a crashed worker, a failing global
  // setup) must still show as a failure.
  if (!ok && counts.failed === 0 && counts.failedFiles === 0) parts.push(`FAILED (exit ${step.exitCode})`);
  return { text: `${step.name} ${parts.join(', ')}`, ok };
}

/**
 * Builds the summary line. The run passes only when every step ran and passed.
 * @param steps the steps in the order they ran
 * @param seconds wall-clock duration of the whole run, shown at the end when given
 */
export function buildSummary(steps: readonly StepOutcome[], seconds?: number): Summary {
  const described = steps.map(describeStep);
  let passed = 0;
  let failed = 0;
  for (const step of steps) {
    if (step.kind === 'tests' && step.counts) {
      passed += step.counts.passed;
      failed += step.counts.failed;
    }
  }
  const failedSteps = steps.filter((_, index) => !described[index].ok).map((step) => step.name);
  const ok = steps.length > 0 && failedSteps.length === 0;
  let line = `orderly tests: ${described.map((d) => d.text).join(', ')} — ${passed} passed, ${failed} failed`;
  if (!ok) line += `; FAILED: ${failedSteps.join(', ') || 'no steps ran'}`;
  if (seconds !== undefined) line += ` (${Math.round(seconds)} s)`;
  return { line, ok };
}

/**
 * Parses the step file written by scripts/test.sh: one step a line,
 * `name<TAB>kind<TAB>exitCode-or-"-"<TAB>report path or empty`.
 * @param readReport returns the parsed JSON of a report path, or null when it cannot be read
 */
export function parseStepFile(text: string, readReport: (path: string) => unknown): StepOutcome[] {
  const steps: StepOutcome[] = [];
  for (const raw of text.split('\n')) {
    if (raw.trim() === '') continue;
    const [name, kind, code, reportPath] = raw.split('\t');
    if (kind !== 'check' && kind !== 'tests') throw new Error(`step file: unknown kind "${kind}" in line "${raw}"`);
    const exitCode = code === '-' ? null : Number.parseInt(code, 10);
    if (exitCode !== null && !Number.isInteger(exitCode)) throw new Error(`step file: bad exit code in line "${raw}"`);
    const step: StepOutcome = { name, kind, exitCode };
    if (kind === 'tests') step.counts = reportPath ? countsFromVitestJson(readReport(reportPath)) : null;
    steps.push(step);
  }
  return steps;
}
