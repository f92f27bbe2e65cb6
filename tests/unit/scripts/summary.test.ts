// The summary line of `npm test` (scripts/lib/summary.ts). The report-reading tests run the
// real vitest of this repository on generated test files, so they follow vitest's JSON format
// (the reference) rather than a copy of it written by hand.
import { execFile } from 'node:child_process';
import { mkdtemp, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { promisify } from 'node:util';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildSummary, countsFromVitestJson, parseStepFile, type StepOutcome } from '../../../scripts/lib/summary.ts';

const run = promisify(execFile);
const vitestBin = resolve('node_modules/vitest/vitest.mjs');

/** Runs vitest on `files` in a temporary folder and returns its parsed JSON report. */
async function realReport(files: Record<string, string>): Promise<unknown> {
  const dir = await mkdtemp(join(tmpdir(), 'orderly-summary-'));
  try {
    for (const [name, text] of Object.entries(files)) await writeFile(join(dir, name), text);
    const report = join(dir, 'report.json');
    // Drop the outer vitest's variables so the inner run behaves like a run of its own.
    const env = Object.fromEntries(Object.entries(process.env).filter(([key]) => !key.startsWith('VITEST')));
    await run(process.execPath, [vitestBin, 'run', '--root', dir, '--globals', '--reporter=json', `--outputFile.json=${report}`], { env }).catch(
      () => undefined, // a run with failures exits 1; the report is what is checked
    );
    return JSON.parse(await readFile(report, 'utf8'));
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

describe('countsFromVitestJson on reports written by vitest itself', () => {
  let mixed: unknown;
  let clean: unknown;
  beforeAll(async () => {
    [mixed, clean] = await Promise.all([
      realReport({
        'a.test.js': [
          "test('passes', () => { expect(1 + 1).toBe(2); });",
          "test('fails', () => { expect(1 + 1).toBe(3); });",
          "test.skip('skipped', () => {});",
          "test.todo('later');",
        ].join('\n'),
        // A file whose import throws holds no failed test but must still count as broken.
        'b.test.js': "import './missing-module.js';\ntest('never runs', () => {});\n",
      }),
      realReport({ 'c.test.js': "test('one', () => {});\ntest('two', () => {});\n" }),
    ]);
  }, 60_000);

  it('counts passed, failed, skipped+todo and broken files', () => {
    expect(countsFromVitestJson(mixed)).toEqual({ passed: 1, failed: 1, skipped: 2, failedFiles: 1 });
  });

  it('counts a clean run', () => {
    expect(countsFromVitestJson(clean)).toEqual({ passed: 2, failed: 0, skipped: 0, failedFiles: 0 });
  });

  it('refuses what is not a report', () => {
    expect(countsFromVitestJson(null)).toBeNull();
    expect(countsFromVitestJson({ hello: 1 })).toBeNull();
  });
});

const clean = (passed: number) => ({ passed, failed: 0, skipped: 0, failedFiles: 0 });

describe('buildSummary', () => {
  const allGood: StepOutcome[] = [
    { name: 'typecheck', kind: 'check', exitCode: 0 },
    { name: 'lint', kind: 'check', exitCode: 0 },
    { name: 'unit', kind: 'tests', exitCode: 0, counts: clean(120) },
    { name: 'api', kind: 'tests', exitCode: 0, counts: clean(40) },
    { name: 'e2e', kind: 'tests', exitCode: 0, counts: clean(3) },
  ];

  it('prints the passing line with the totals', () => {
    expect(buildSummary(allGood, 83.6)).toEqual({
      line: 'orderly tests: typecheck ok, lint ok, unit 120 passed, api 40 passed, e2e 3 passed — 163 passed, 0 failed (84 s)',
      ok: true,
    });
  });

  it('names failed checks and failed tests', () => {
    const steps: StepOutcome[] = [
      { name: 'typecheck', kind: 'check', exitCode: 2 },
      { name: 'unit', kind: 'tests', exitCode: 1, counts: { passed: 10, failed: 2, skipped: 1, failedFiles: 0 } },
    ];
    expect(buildSummary(steps)).toEqual({
      line: 'orderly tests: typecheck FAILED, unit 10 passed, 2 failed, 1 skipped — 10 passed, 2 failed; FAILED: typecheck, unit',
      ok: false,
    });
  });

  it('fails a non-zero exit even when the report shows no failed test', () => {
    const summary = buildSummary([{ name: 'api', kind: 'tests', exitCode: 1, counts: clean(5) }]);
    expect(summary.ok).toBe(false);
    expect(summary.line).toBe('orderly tests: api 5 passed, FAILED (exit 1) — 5 passed, 0 failed; FAILED: api');
  });

  it('fails broken files, missing reports and steps that did not run', () => {
    const summary = buildSummary([
      { name: 'unit', kind: 'tests', exitCode: 1, counts: { passed: 0, failed: 0, skipped: 0, failedFiles: 2 } },
      { name: 'api', kind: 'tests', exitCode: 1, counts: null },
      { name: 'e2e', kind: 'tests', exitCode: null },
    ]);
    expect(summary.line).toBe(
      'orderly tests: unit 0 passed, 2 files broken, api FAILED (no report, exit 1), e2e not run — 0 passed, 0 failed; FAILED: unit, api, e2e',
    );
    expect(summary.ok).toBe(false);
  });

  it('shows a project without tests as such and lets it pass', () => {
    const summary = buildSummary([{ name: 'e2e', kind: 'tests', exitCode: 0, counts: clean(0) }]);
    expect(summary).toEqual({ line: 'orderly tests: e2e no tests — 0 passed, 0 failed', ok: true });
  });

  it('never passes an empty run', () => {
    expect(buildSummary([]).ok).toBe(false);
  });
});

describe('parseStepFile', () => {
  it('reads the lines scripts/test.sh writes', () => {
    const reports: Record<string, unknown> = {
      '/r/unit.json': { numTotalTests: 3, numPassedTests: 3, numFailedTests: 0, numPendingTests: 0, numTodoTests: 0, testResults: [] },
    };
    const text = 'typecheck\tcheck\t0\t\nunit\ttests\t0\t/r/unit.json\ne2e\ttests\t-\t\n';
    expect(parseStepFile(text, (path) => reports[path] ?? null)).toEqual([
      { name: 'typecheck', kind: 'check', exitCode: 0 },
      { name: 'unit', kind: 'tests', exitCode: 0, counts: clean(3) },
      { name: 'e2e', kind: 'tests', exitCode: null, counts: null },
    ]);
  });

  it('refuses a line it does not understand', () => {
    expect(() => parseStepFile('unit\tsuite\t0\t\n', () => null)).toThrow('unknown kind "suite"');
  });
});
