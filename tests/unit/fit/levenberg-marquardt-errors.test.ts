/** The exact messages levenbergMarquardt throws on malformed problems and options (EngineError 'invalid_input'). */
import { describe, expect, it } from 'vitest';
import { EngineError } from '../../../shared/engine/errors.ts';
import { type LeastSquaresProblem, type LevenbergMarquardtOptions, levenbergMarquardt } from '../../../shared/engine/fit/levenberg-marquardt.ts';

const problem: LeastSquaresProblem = {
  residualCount: 3,
  residuals(p, out) {
    for (let i = 0; i < 3; i++) out[i] = i - p[0] - p[1] * i;
  },
};

const cases: Array<[string, () => unknown, string]> = [
  ['no parameters', () => levenbergMarquardt(problem, []), 'Levenberg–Marquardt needs at least one parameter.'],
  ['no residuals', () => levenbergMarquardt({ ...problem, residualCount: 0 }, [0, 0]), 'Levenberg–Marquardt residualCount must be a whole number ≥ 1, got 0.'],
  ['a NaN start', () => levenbergMarquardt(problem, [0, Number.NaN]), 'Levenberg–Marquardt start parameter 1 is NaN; give a finite value.'],
  ['steps of the wrong length', () => levenbergMarquardt(problem, [0, 0], { steps: [1e-6] }), 'Levenberg–Marquardt steps have 1 entries for 2 parameters.'],
  ['a zero step', () => levenbergMarquardt(problem, [0, 0], { steps: [1e-6, 0] }), 'Levenberg–Marquardt step 1 is 0; steps must be finite and non-zero.'],
  ['bounds of the wrong length', () => levenbergMarquardt(problem, [0, 0], { lower: [0] }), 'Levenberg–Marquardt lower bounds have 1 entries for 2 parameters.'],
  ['a NaN bound', () => levenbergMarquardt(problem, [0, 0], { upper: [1, Number.NaN] }), 'Levenberg–Marquardt upper bound 1 is NaN.'],
  ['crossed bounds', () => levenbergMarquardt(problem, [0, 0], { lower: [0, 2], upper: [1, 1] }), 'Levenberg–Marquardt bounds for parameter 1 are [2, 1]; the lower must not exceed the upper.'],
  ['a fractional maxIterations', () => levenbergMarquardt(problem, [0, 0], { maxIterations: 2.5 }), 'Levenberg–Marquardt maxIterations must be a whole number ≥ 0, got 2.5.'],
  ['covarianceRows beyond the residuals', () => levenbergMarquardt(problem, [0, 0], { covarianceRows: 4 }), 'Levenberg–Marquardt covarianceRows must be a whole number in 1…3, got 4.'],
  ['a zero initialDamping', () => levenbergMarquardt(problem, [0, 0], { initialDamping: 0 }), 'Levenberg–Marquardt initialDamping must be a finite number > 0, got 0.'],
  ['a negative ftol', () => levenbergMarquardt(problem, [0, 0], { ftol: -1 } as LevenbergMarquardtOptions), 'Levenberg–Marquardt ftol must be a finite number ≥ 0, got -1.'],
];

describe('levenbergMarquardt refuses malformed input', () => {
  it.each(cases)('%s', (_label, run, message) => {
    let error: unknown;
    try {
      run();
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(EngineError);
    expect((error as EngineError).code).toBe('invalid_input');
    expect((error as EngineError).message).toBe(message);
  });
});
