/**
 * `npm run eval:detect -- --seed <n> [--units <n>] [--hours <n>] [--fault-free] [--evidence] [--json]`
 * Runs the simulator offline with injected faults through the health engine and scores the alarms against the ground
 * truth (see run-eval.ts for the rules). With --json the last stdout line is the result as JSON.
 */
import { parseArgs } from 'node:util';
import { runEval, SCORED_KINDS } from './run-eval';

export const EVAL_DEFAULTS = { units: 24, hours: 96 };

function main(): void {
  let values;
  try {
    ({ values } = parseArgs({
      args: process.argv.slice(2),
      strict: true,
      options: {
        seed: { type: 'string' },
        units: { type: 'string' },
        hours: { type: 'string' },
        json: { type: 'boolean' },
        'fault-free': { type: 'boolean' },
        evidence: { type: 'boolean' },
        start: { type: 'string' },
        help: { type: 'boolean' },
      },
    }));
  } catch (e) {
    process.stderr.write(`${(e as Error).message}\n`);
    process.exit(2);
  }
  if (values.help) {
    process.stdout.write(
      'eval:detect --seed <n> [--units <n> (default 24)] [--hours <n> (default 96)] [--fault-free] [--evidence] [--start <ISO instant>] [--json]\n',
    );
    return;
  }
  const num = (name: string, text: string | undefined, dflt: number, lo: number, hi: number) => {
    if (text === undefined) return dflt;
    const x = Number(text);
    if (!Number.isInteger(x) || x < lo || x > hi) {
      process.stderr.write(`--${name} must be a whole number in ${lo}…${hi}, got ${text}\n`);
      process.exit(2);
    }
    return x;
  };
  const seed = num('seed', values.seed, 1, 0, 2 ** 31);
  const units = num('units', values.units, EVAL_DEFAULTS.units, 1, 2000);
  const hours = num('hours', values.hours, EVAL_DEFAULTS.hours, 1, 24 * 60);
  const { result } = runEval({ seed, units, hours, faultFree: values['fault-free'], evidence: values.evidence, startIso: values.start });
  if (values.json) {
    process.stdout.write(`${JSON.stringify(result)}\n`);
    return;
  }
  const pct = (x: number | null) => (x === null ? '  n/a' : `${(x * 100).toFixed(1).padStart(5)} %`);
  process.stdout.write(
    `seed ${seed}: ${units} units × ${hours} h = ${result.unitDays} unit-days, ${result.injected} faults injected, ${result.runtimeS} s\n`,
  );
  process.stdout.write('kind       precision   recall   median delay   alarms  truths  eligible\n');
  for (const k of SCORED_KINDS) {
    const d = result.detectors[k];
    process.stdout.write(
      `${k.padEnd(10)} ${pct(d.precision)}   ${pct(d.recall)}   ${d.medianDelayMin === null ? '   n/a' : `${d.medianDelayMin.toFixed(1).padStart(6)} min`}   ${String(d.alarms).padStart(6)}  ${String(d.truths).padStart(6)}  ${String(d.eligible).padStart(8)}\n`,
    );
  }
  process.stdout.write(
    `false alarms: ${result.falseAlarms} (${result.falseAlarmsPer100UnitDays} per 100 unit-days); other alarms: ${JSON.stringify(result.otherAlarms)}\n`,
  );
}

main();
