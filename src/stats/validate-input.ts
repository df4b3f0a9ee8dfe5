/**
 * Input checks shared by the statistics functions. Every function in `src/stats` rejects NaN,
 * non-numbers and out-of-domain values with a `RangeError` whose message names the function,
 * the argument and the value received, instead of silently returning NaN.
 */

/**
 * Throws unless `value` is a finite number (not NaN, not ±Infinity). Plain input validation,
 * not a published statistical method.
 * @param fn name of the calling function, used in the message
 * @param name name of the argument, used in the message
 * @param value the value to check
 * @returns nothing; throws `RangeError` when the check fails
 * @example
 * assertFinite('wilsonInterval', 'n', 10); // => undefined (no throw)
 * assertFinite('wilsonInterval', 'n', NaN); // throws RangeError: wilsonInterval: n must be a finite number, got NaN
 */
export function assertFinite(fn: string, name: string, value: number): void {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new RangeError(`${fn}: ${name} must be a finite number, got ${String(value)}`);
  }
}

/**
 * Throws unless `value` is a number that is not NaN (±Infinity allowed). Plain input
 * validation, not a published statistical method.
 * @param fn name of the calling function, used in the message
 * @param name name of the argument, used in the message
 * @param value the value to check
 * @returns nothing; throws `RangeError` when the check fails
 * @example
 * assertNotNaN('normalCdf', 'x', -Infinity); // => undefined (no throw)
 * assertNotNaN('normalCdf', 'x', NaN); // throws RangeError: normalCdf: x must be a number, got NaN
 */
export function assertNotNaN(fn: string, name: string, value: number): void {
  if (typeof value !== 'number' || Number.isNaN(value)) {
    throw new RangeError(`${fn}: ${name} must be a number, got ${String(value)}`);
  }
}

/**
 * Throws unless `value` is a probability, i.e. a number in the closed interval [0, 1].
 * Plain input validation, not a published statistical method.
 * @param fn name of the calling function, used in the message
 * @param name name of the argument, used in the message
 * @param value the value to check
 * @returns nothing; throws `RangeError` when the check fails
 * @example
 * assertProbability('proportionTest', 'p0', 0.25); // => undefined (no throw)
 * assertProbability('proportionTest', 'p0', 1.5); // throws RangeError: proportionTest: p0 must be a number in [0, 1], got 1.5
 */
export function assertProbability(fn: string, name: string, value: number): void {
  if (typeof value !== 'number' || Number.isNaN(value) || value < 0 || value > 1) {
    throw new RangeError(`${fn}: ${name} must be a number in [0, 1], got ${String(value)}`);
  }
}

/**
 * Throws unless `x` is a success count compatible with `n` trials: finite and in [0, n].
 * A value outside [0, n] by no more than 1e-9·max(1, n) is accepted as floating-point
 * rounding of a weighted count (p̂·n_eff) and clamped into [0, n]. Plain input validation,
 * not a published statistical method.
 * @param fn name of the calling function, used in the message
 * @param xName name of the count argument, used in the message
 * @param x the success count (may be non-integer for weighted data)
 * @param n the number of trials (must already be known finite)
 * @returns `x`, clamped into [0, n]
 * @example
 * checkCount('wilsonInterval', 'x', 10.000000000001, 10); // => 10
 * checkCount('wilsonInterval', 'x', 11, 10); // throws RangeError: wilsonInterval: x must be in [0, n] = [0, 10], got 11
 */
export function checkCount(fn: string, xName: string, x: number, n: number): number {
  assertFinite(fn, xName, x);
  const slack = 1e-9 * Math.max(1, Math.abs(n));
  if (x < -slack || x > n + slack) {
    throw new RangeError(`${fn}: ${xName} must be in [0, n] = [0, ${n}], got ${x}`);
  }
  return Math.min(Math.max(x, 0), n);
}
