/**
 * Prints the final line of `npm test` and exits 0 when every step passed, 1 otherwise.
 * Usage: node --import tsx scripts/summarize-tests.ts <step file> [seconds]
 * (scripts/test.sh writes the step file; its format is in scripts/lib/summary.ts).
 */
import { readFileSync } from 'node:fs';
import { buildSummary, parseStepFile } from './lib/summary.ts';

const [stepFile, secondsArg] = process.argv.slice(2);
if (!stepFile) {
  console.error('usage: summarize-tests.ts <step file> [seconds]');
  process.exit(2);
}

function readReport(path: string): unknown {
  try {
    return JSON.parse(readFileSync(path, 'utf8'));
  } catch {
    return null;
  }
}

const steps = parseStepFile(readFileSync(stepFile, 'utf8'), readReport);
const seconds = secondsArg === undefined ? undefined : Number(secondsArg);
const summary = buildSummary(steps, Number.isFinite(seconds) ? seconds : undefined);
console.log(summary.line);
process.exit(summary.ok ? 0 : 1);
