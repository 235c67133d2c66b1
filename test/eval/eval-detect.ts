/**
 * `npm run eval:detect -- --seed <n> [--model site|truth] [--survey-error none|low|high] [--units <n>] [--hours <n>]
 *  [--fault-free] [--evidence] [--start <ISO instant>] [--json]`
 * Runs the simulator offline with injected faults through the health engine and scores the alarms against the ground
 * truth (see run-eval.ts for the rules, eval-models.ts for the models). With --json the last stdout line is the result as JSON.
 */
import { parseArgs } from 'node:util';
import { pathToFileURL } from 'node:url';
import { SURVEY_ERROR_LEVELS, parseSurveyErrorLevel } from '../../simulator/survey-error';
import { EVAL_MODELS, type EvalModel } from './eval-models';
import { runEval, SCORED_KINDS, type EvalOptions, type KindScore } from './run-eval';

/** Default size: 48 units × 120 h = 240 unit-days. */
export const EVAL_DEFAULTS = { units: 48, hours: 120 };

const USAGE =
  'eval:detect --seed <n> [--model site|truth (default truth)] [--survey-error none|low|high (default none; site model only)] ' +
  `[--units <n> (default ${EVAL_DEFAULTS.units})] [--hours <n> (default ${EVAL_DEFAULTS.hours})] [--fault-free] [--evidence] [--start <ISO instant>] [--json]\n`;

export type ParsedArgs = { help: true } | { help: false; json: boolean; options: EvalOptions };

/** Parses the command line; throws an Error whose message names the bad option. */
export function parseEvalArgs(argv: string[]): ParsedArgs {
  const { values } = parseArgs({
    args: argv,
    strict: true,
    options: {
      seed: { type: 'string' },
      model: { type: 'string' },
      'survey-error': { type: 'string' },
      units: { type: 'string' },
      hours: { type: 'string' },
      json: { type: 'boolean' },
      'fault-free': { type: 'boolean' },
      evidence: { type: 'boolean' },
      start: { type: 'string' },
      help: { type: 'boolean' },
    },
  });
  if (values.help) return { help: true };
  const num = (name: string, text: string | undefined, dflt: number, lo: number, hi: number) => {
    if (text === undefined) return dflt;
    const x = Number(text);
    if (!Number.isInteger(x) || x < lo || x > hi) throw new Error(`--${name} must be a whole number in ${lo}…${hi}, got ${text}`);
    return x;
  };
  const model = values.model ?? 'truth';
  if (!(EVAL_MODELS as readonly string[]).includes(model))
    throw new Error(`--model must be one of ${EVAL_MODELS.join(', ')}, got ${model}`);
  const errorText = values['survey-error'];
  if (errorText !== undefined && model !== 'site')
    throw new Error('--survey-error applies to --model site only (the truth model is the simulated sky itself)');
  let surveyError;
  try {
    surveyError = parseSurveyErrorLevel(errorText ?? 'none');
  } catch {
    throw new Error(`--survey-error must be one of ${SURVEY_ERROR_LEVELS.join(', ')}, got ${errorText}`);
  }
  if (values.start !== undefined && !Number.isFinite(Date.parse(values.start)))
    throw new Error(`--start must be an ISO 8601 instant, got ${values.start}`);
  return {
    help: false,
    json: !!values.json,
    options: {
      seed: num('seed', values.seed, 1, 0, 2 ** 31),
      units: num('units', values.units, EVAL_DEFAULTS.units, 1, 2000),
      hours: num('hours', values.hours, EVAL_DEFAULTS.hours, 1, 24 * 60),
      model: model as EvalModel,
      surveyError,
      faultFree: values['fault-free'],
      evidence: values.evidence,
      startIso: values.start,
    },
  };
}

function main(): void {
  let parsed: ParsedArgs;
  try {
    parsed = parseEvalArgs(process.argv.slice(2));
  } catch (e) {
    process.stderr.write(`${(e as Error).message}\n`);
    process.exit(2);
  }
  if (parsed.help) {
    process.stdout.write(USAGE);
    return;
  }
  const o = parsed.options;
  const { result } = runEval(o);
  if (parsed.json) {
    process.stdout.write(`${JSON.stringify(result)}\n`);
    return;
  }
  const pct = (x: number | null) => (x === null ? '  n/a' : `${(x * 100).toFixed(1).padStart(5)} %`);
  const ci = (x: [number, number] | null) => (x === null ? '       n/a     ' : `[${pct(x[0]).trim()}, ${pct(x[1]).trim()}]`.padEnd(15));
  const cell = (p: number | null, k: number, n: number, i: [number, number] | null) => `${pct(p)} ${`${k}/${n}`.padStart(7)} ${ci(i)}`;
  process.stdout.write(
    `seed ${o.seed}, model ${result.model}${result.model === 'site' ? ` (survey error ${result.surveyError})` : ''}: ${o.units} units × ${o.hours} h = ${result.unitDays} unit-days, ` +
      `${result.injected} faults injected (${result.relocated.placed} of ${result.relocated.scheduled} lesser-peak relocations placed), ${result.runtimeS} s\n`,
  );
  process.stdout.write('kind       precision (count, 95 % Wilson)        recall (count, 95 % Wilson)           median delay   truths\n');
  for (const k of SCORED_KINDS) {
    const d: KindScore = result.detectors[k];
    process.stdout.write(
      `${k.padEnd(10)} ${cell(d.precision, d.matched, d.alarms, d.precisionCi95)}   ${cell(d.recall, d.found, d.eligible, d.recallCi95)}   ` +
        `${d.medianDelayMin === null ? '   n/a    ' : `${d.medianDelayMin.toFixed(1).padStart(6)} min`}   ${String(d.truths).padStart(6)}\n`,
    );
  }
  process.stdout.write(
    `false alarms: ${result.falseAlarms} (${result.falseAlarmsPer100UnitDays} per 100 unit-days); other alarms: ${JSON.stringify(result.otherAlarms)}\n`,
  );
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) main();
