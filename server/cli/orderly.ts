/**
 * `orderly calibrate` and `orderly apply`: the engine from the command line, for acquisition
 * computers. The JSON printed with `--json` is a fixed contract (README, "Command line").
 */
import { parseArgs, type ParseArgsConfig } from 'node:util';

type ParseArgsOptionsConfig = NonNullable<ParseArgsConfig['options']>;
import { readFile, readdir, stat } from 'node:fs/promises';
import path from 'node:path';
import type { KnownLine } from '../../shared/engine/known-lines.ts';
import { FlagValueError, runCalibrate, runApply, type CliFailure } from './commands.ts';
import { formatApplyTable, formatCalibrateTable } from './tables.ts';

const USAGE = `usage:
  orderly calibrate FRAME --profile PROFILE.json --driver-nm N [--driver-tolerance-pct SIGMA] [--blue-shift-pct B]
      [--parity odd|all] [--filters Al,Zr] [--dark DARK] [--page K] [--pin PIXEL=Q ...]
      [--line PIXEL=ENERGY_EV[@LABEL] ...] [--signal START:END] [--background START:END ...]
      [--model auto|grating|poly:N] [--json]
  orderly apply FRAME... --calibration CAL.json [--dark DARK] [--page K] [--json]

  --page K    page of a multi-page frame, counted from 0; a one-page DARK is subtracted from
              every page, a DARK stack with as many pages as FRAME page by page
  --line      the peak nearest PIXEL has first-order photon energy ENERGY_EV (a line of known
              energy, or a harmonic measured elsewhere): an absolute anchor of the scale`;

class UsageError extends Error {}

async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  if (command === undefined || command === '--help' || command === '-h') {
    console.log(USAGE);
    return command === undefined ? 2 : 0;
  }
  const json = rest.includes('--json');
  try {
    if (command === 'calibrate') return await calibrateCommand(rest, json);
    if (command === 'apply') return await applyCommand(rest, json);
    throw new UsageError(`unknown command '${command}'`);
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    console.error(`orderly: ${message}`);
    if (error instanceof UsageError) console.error(USAGE);
    if (json) console.log(JSON.stringify({ status: 'failed', message }));
    return error instanceof UsageError || error instanceof FlagValueError ? 2 : 1;
  }
}

function parse(args: string[], options: ParseArgsOptionsConfig) {
  try {
    return parseArgs({ args, options, allowPositionals: true, strict: true });
  } catch (error) {
    throw new UsageError(error instanceof Error ? error.message : String(error));
  }
}

function parseBand(text: string, flag: string): { start: number; end: number } {
  const match = /^(\d+):(\d+)$/.exec(text);
  if (!match) throw new UsageError(`${flag} expects START:END in pixels, got '${text}'`);
  const start = Number(match[1]);
  const end = Number(match[2]);
  if (end <= start) throw new UsageError(`${flag} ${text}: END must be greater than START`);
  return { start, end };
}

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i;

/** `--line PIXEL=ENERGY_EV`, optionally `@LABEL`: a line of known first-order photon energy. */
function parseKnownLine(text: string): KnownLine {
  const at = text.indexOf('@');
  const [value, label] = at < 0 ? [text, undefined] : [text.slice(0, at), text.slice(at + 1).trim()];
  const parts = value.split('=');
  if (parts.length !== 2) throw new UsageError(`--line expects PIXEL=ENERGY_EV (e.g. 812.4=72.7, or 812.4=72.7@Al-edge), got '${text}'`);
  const [pixelText, energyText] = parts.map((p) => p.trim());
  if (!DECIMAL.test(pixelText)) throw new UsageError(`--line ${text}: PIXEL must be a number, got '${pixelText}'`);
  if (!DECIMAL.test(energyText) || !(Number(energyText) > 0)) throw new UsageError(`--line ${text}: ENERGY_EV must be a positive number of eV, got '${energyText}'`);
  if (label === '') throw new UsageError(`--line ${text}: the label after @ is empty`);
  return { pixel: Number(pixelText), energyEv: Number(energyText), ...(label ? { label } : {}) };
}

function parseNumber(text: string | undefined, flag: string): number | undefined {
  if (text === undefined) return undefined;
  const value = Number(text);
  if (!Number.isFinite(value)) throw new UsageError(`${flag} expects a number, got '${text}'`);
  return value;
}

function parsePage(text: string | undefined): number | undefined {
  const page = parseNumber(text, '--page');
  if (page !== undefined && !(Number.isInteger(page) && page >= 0)) throw new UsageError(`--page expects a page number counted from 0, got '${text}'`);
  return page;
}

async function readJsonFile(file: string, what: string): Promise<unknown> {
  let text: string;
  try {
    text = await readFile(file, 'utf8');
  } catch {
    throw new Error(`cannot read ${what} '${file}'`);
  }
  try {
    return JSON.parse(text);
  } catch (error) {
    throw new Error(`${what} '${file}' is not valid JSON: ${(error as Error).message}`);
  }
}

async function readBytes(file: string, what: string): Promise<Uint8Array> {
  try {
    return new Uint8Array(await readFile(file));
  } catch {
    throw new Error(`cannot read ${what} '${file}'`);
  }
}

async function calibrateCommand(args: string[], json: boolean): Promise<number> {
  const { values, positionals } = parse(args, {
    profile: { type: 'string' },
    'driver-nm': { type: 'string' },
    'driver-tolerance-pct': { type: 'string' },
    'blue-shift-pct': { type: 'string' },
    parity: { type: 'string' },
    filters: { type: 'string' },
    dark: { type: 'string' },
    page: { type: 'string' },
    pin: { type: 'string', multiple: true },
    line: { type: 'string', multiple: true },
    signal: { type: 'string' },
    background: { type: 'string', multiple: true },
    model: { type: 'string' },
    json: { type: 'boolean' },
  });
  if (positionals.length !== 1) throw new UsageError('calibrate takes exactly one FRAME');
  if (typeof values.profile !== 'string') throw new UsageError('--profile PROFILE.json is required');
  const driverNm = parseNumber(values['driver-nm'] as string | undefined, '--driver-nm');
  if (driverNm === undefined) throw new UsageError('--driver-nm N is required');
  const parity = (values.parity as string | undefined) ?? 'odd';
  if (parity !== 'odd' && parity !== 'all') throw new UsageError(`--parity must be odd or all, got '${parity}'`);
  const pins = ((values.pin as string[] | undefined) ?? []).map((text) => {
    const match = /^(-?[\d.]+)=(\d+)$/.exec(text);
    if (!match) throw new UsageError(`--pin expects PIXEL=Q (e.g. 812.4=23), got '${text}'`);
    return { pixel: Number(match[1]), harmonic: Number(match[2]) };
  });
  const knownLines = ((values.line as string[] | undefined) ?? []).map(parseKnownLine);
  const model = (values.model as string | undefined) ?? 'auto';
  if (!/^(auto|grating|poly:\d+)$/.test(model)) throw new UsageError(`--model must be auto, grating or poly:N, got '${model}'`);

  const result = await runCalibrate({
    frameBytes: await readBytes(positionals[0], 'frame'),
    darkBytes: typeof values.dark === 'string' ? await readBytes(values.dark, 'dark frame') : undefined,
    names: { frame: positionals[0], dark: typeof values.dark === 'string' ? values.dark : undefined },
    page: parsePage(values.page as string | undefined),
    profile: await readJsonFile(values.profile, 'profile'),
    driverNm,
    driverTolerancePct: parseNumber(values['driver-tolerance-pct'] as string | undefined, '--driver-tolerance-pct'),
    blueShiftPct: parseNumber(values['blue-shift-pct'] as string | undefined, '--blue-shift-pct'),
    parity,
    filters: typeof values.filters === 'string' ? values.filters.split(',').map((s: string) => s.trim()).filter(Boolean) : [],
    pins,
    knownLines,
    signal: typeof values.signal === 'string' ? parseBand(values.signal, '--signal') : undefined,
    background: ((values.background as string[] | undefined) ?? []).map((b) => parseBand(b, '--background')),
    model,
  });
  if (json) console.log(JSON.stringify(result));
  else console.log(formatCalibrateTable(result));
  if (result.status === 'failed') {
    console.error(`orderly: ${result.message}`);
    return 1;
  }
  return 0;
}

/** Expands folders into their frame files (sorted by name), so a scan folder can be given whole. */
async function expandFrames(inputs: string[]): Promise<string[]> {
  const files: string[] = [];
  for (const input of inputs) {
    const info = await stat(input).catch(() => null);
    if (info?.isDirectory()) {
      const names = (await readdir(input)).filter((n) => /\.(tiff?|png|fits?|fts)$/i.test(n)).sort();
      files.push(...names.map((n) => path.join(input, n)));
    } else {
      files.push(input);
    }
  }
  return files;
}

async function applyCommand(args: string[], json: boolean): Promise<number> {
  const { values, positionals } = parse(args, {
    calibration: { type: 'string' },
    dark: { type: 'string' },
    page: { type: 'string' },
    json: { type: 'boolean' },
  });
  if (positionals.length === 0) throw new UsageError('apply needs at least one FRAME');
  if (typeof values.calibration !== 'string') throw new UsageError('--calibration CAL.json is required');
  const calibrationJson = await readJsonFile(values.calibration, 'calibration');
  const darkBytes = typeof values.dark === 'string' ? await readBytes(values.dark, 'dark frame') : undefined;
  const page = parsePage(values.page as string | undefined);
  const frames = await expandFrames(positionals);
  if (frames.length === 0) throw new Error('no frame files found in the given folder');
  let failures = 0;
  for (const frame of frames) {
    let outcome: Awaited<ReturnType<typeof runApply>> | CliFailure;
    try {
      outcome = await runApply({ frameBytes: await readBytes(frame, 'frame'), darkBytes, names: { dark: values.dark as string | undefined }, page, calibrationJson });
    } catch (error) {
      outcome = { status: 'failed', message: error instanceof Error ? error.message : String(error) };
    }
    if ('status' in outcome) {
      failures += 1;
      console.error(`orderly: ${frame}: ${outcome.message}`);
      if (json) console.log(JSON.stringify({ status: 'failed', frame, message: outcome.message }));
      continue;
    }
    if (json) console.log(JSON.stringify(outcome));
    else console.log(`${frame}\n${formatApplyTable(outcome)}`);
  }
  return failures > 0 ? 1 : 0;
}

process.exitCode = await main(process.argv.slice(2));
