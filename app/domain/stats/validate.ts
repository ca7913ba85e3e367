/**
 * Input checks shared by the statistics modules. Every check throws an Error
 * whose message names the function and the problem, so that no statistic is
 * ever computed from bad input and no NaN is returned silently.
 */

/**
 * Asserts that every value is a finite number.
 * @param values the sample
 * @param what a name for the sample in the error message (e.g. "welchT: x")
 * @throws Error when a value is NaN, infinite or not a number
 */
export function assertFinite(values: readonly number[], what: string): void {
  if (!Array.isArray(values)) throw new Error(`${what} must be an array of numbers`);
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (typeof v !== "number" || !Number.isFinite(v)) {
      throw new Error(`${what} contains a value that is not a finite number (${String(v)} at index ${i})`);
    }
  }
}

/**
 * Asserts that a sample has at least `min` finite values.
 * @throws Error when the sample is too small or contains NaN/Infinity
 */
export function assertSample(values: readonly number[], min: number, what: string): void {
  assertFinite(values, what);
  if (values.length < min) {
    throw new Error(`${what} requires at least ${min} value${min === 1 ? "" : "s"}, got ${values.length}`);
  }
}

/**
 * Asserts that the values are not all equal (a zero spread makes t, d and similar
 * statistics undefined).
 * @throws Error when every value is the same
 */
export function assertNotAllEqual(values: readonly number[], what: string): void {
  if (values.length > 0 && values.every((v) => v === values[0])) {
    throw new Error(`${what}: all values are equal (${values[0]}), so the spread is zero and the statistic is undefined`);
  }
}

/**
 * Asserts a probability-like level strictly between 0 and 1.
 * @throws Error when the level is outside (0, 1)
 */
export function assertLevel(level: number, what: string): void {
  if (typeof level !== "number" || !Number.isFinite(level) || level <= 0 || level >= 1) {
    throw new Error(`${what} must be a number strictly between 0 and 1, got ${String(level)}`);
  }
}

/**
 * Asserts a finite number.
 * @throws Error when the value is not finite
 */
export function assertFiniteNumber(value: number, what: string): void {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    throw new Error(`${what} must be a finite number, got ${String(value)}`);
  }
}

/**
 * Asserts that two paired samples have the same length.
 * @throws Error when the lengths differ
 */
export function assertPaired(x: readonly number[], y: readonly number[], what: string): void {
  if (x.length !== y.length) {
    throw new Error(`${what}: paired samples must have the same length, got ${x.length} and ${y.length}`);
  }
}

/**
 * Asserts an integer not below `min`.
 * @throws Error otherwise
 */
export function assertInteger(value: number, min: number, what: string): void {
  if (!Number.isInteger(value) || value < min) {
    throw new Error(`${what} must be an integer >= ${min}, got ${String(value)}`);
  }
}

/**
 * Asserts that a computed spread (SD or SE) is positive and finite: values that differ
 * only below floating-point resolution give a zero spread even when not all equal.
 * @throws Error when the spread is zero or not finite
 */
export function assertPositiveSpread(spread: number, what: string): void {
  if (!(spread > 0) || !Number.isFinite(spread)) {
    throw new Error(`${what}: the spread is zero or not representable (${spread}), so the statistic is undefined`);
  }
}
