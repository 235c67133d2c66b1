import { describe, expect, it } from 'vitest';
import { EVAL_DEFAULTS, parseEvalArgs } from './eval-detect';

describe('eval:detect options', () => {
  it('defaults to the truth model at 48 units × 120 h (240 unit-days)', () => {
    const p = parseEvalArgs(['--seed', '3']);
    expect(p).toMatchObject({ help: false, json: false, options: { seed: 3, units: 48, hours: 120, model: 'truth', surveyError: 'none' } });
    expect((EVAL_DEFAULTS.units * EVAL_DEFAULTS.hours) / 24).toBeGreaterThanOrEqual(240);
  });

  it('takes the site model with a survey error level', () => {
    const p = parseEvalArgs(['--seed', '1001', '--model', 'site', '--survey-error', 'high', '--units', '8', '--hours', '36', '--json']);
    expect(p).toMatchObject({ help: false, json: true, options: { seed: 1001, model: 'site', surveyError: 'high', units: 8, hours: 36 } });
  });

  it('refuses bad values with a message naming the option', () => {
    expect(() => parseEvalArgs(['--model', 'survey'])).toThrow(/--model must be one of site, truth, got survey/);
    expect(() => parseEvalArgs(['--model', 'site', '--survey-error', 'medium'])).toThrow(
      /--survey-error must be one of none, low, high, got medium/,
    );
    expect(() => parseEvalArgs(['--survey-error', 'low'])).toThrow(/--survey-error applies to --model site only/);
    expect(() => parseEvalArgs(['--units', '0'])).toThrow(/--units must be a whole number in 1…2000, got 0/);
    expect(() => parseEvalArgs(['--start', 'yesterday'])).toThrow(/--start/);
    expect(() => parseEvalArgs(['--colour'])).toThrow(/colour/);
  });
});
