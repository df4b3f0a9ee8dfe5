import { expect } from 'vitest';
import { FloorgapError } from '../../src/core/errors.js';

/** Awaits a promise that must reject with a user-facing FloorgapError, and returns that error. */
export async function failure(p: Promise<unknown>): Promise<FloorgapError> {
  const e = await p.then(
    () => null,
    (err: unknown) => err,
  );
  expect(e).toBeInstanceOf(FloorgapError);
  return e as FloorgapError;
}
