/**
 * Typed access to a model's parameter vector. `parameterTuple(p, 3, id)` gives p back as a
 * tuple of exactly 3 numbers (no copy), so a model can name its parameters by destructuring
 * (`const [amplitude, k, offset] = …`) or index it (`q[1]`, no `!` needed); a vector of another
 * length is a caller's mistake (the vector must follow the model's `params`) and throws a
 * RangeError naming the model. Functions called once per point (f, gradient) index the tuple:
 * array destructuring costs several times a plain read in V8.
 * @example parameterTuple([2, 0.1, 1], 3, 'exponential-single') // → [2, 0.1, 1], typed [number, number, number]
 */

/** A read-only tuple of N numbers (N up to a few dozen). */
export type ParameterTuple<N extends number, T extends readonly number[] = readonly []> = T['length'] extends N
  ? T
  : ParameterTuple<N, readonly [...T, number]>;

function hasLength<N extends number>(p: readonly number[], count: N): p is ParameterTuple<N> {
  return p.length === count;
}

export function parameterTuple<N extends number>(p: readonly number[], count: N, modelId: string): ParameterTuple<N> {
  if (!hasLength(p, count)) throw new RangeError(`${modelId}: ${p.length} parameter values given for its ${count} parameters`);
  return p;
}
