/**
 * Checked access for the numeric tests: each helper returns the value asked for or throws,
 * failing the test with a message that names what was missing, instead of passing undefined
 * on to a comparison.
 */
import type { FitResult, ParameterEstimate } from '../../src/numeric/types.js';

export { entry } from '../../src/numeric/linalg.js';

/** list[i]; throws when there is no entry i. */
export function at<T>(list: ArrayLike<T>, i: number): T {
  const value = list[i];
  if (value === undefined) throw new Error(`no entry ${i} in a list of ${list.length}`);
  return value;
}

/** The parameter of a fit with the given name; throws when the fit has none. */
export function param(fit: FitResult, name: string): ParameterEstimate {
  const found = fit.parameters.find((q) => q.name === name);
  if (!found) throw new Error(`the ${fit.modelId} fit has no parameter '${name}' (it has ${fit.parameters.map((q) => q.name).join(', ')})`);
  return found;
}
