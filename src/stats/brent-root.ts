/**
 * Brent's root-finding method (Brent 1973, Algorithms for Minimization without Derivatives,
 * Prentice-Hall, ch. 4, procedure "zero"): inverse quadratic interpolation and secant steps,
 * falling back to bisection whenever they would not shrink the bracket fast enough, so it
 * converges at least as surely as bisection and usually superlinearly.
 * @param f a continuous function with f(lo) and f(hi) of opposite signs (or one of them 0)
 * @param lo one end of the bracket
 * @param hi the other end of the bracket
 * @param tolerance absolute tolerance on the root; the bracket is shrunk below about 2·tolerance
 *   plus 4 ulps of the root (default 0: as accurate as floating point allows)
 * @param maxIterations the iteration limit; default 200
 * @returns a point x in the bracket with f(x) = 0 or a bracket of that width around a sign change
 * @throws RangeError when f(lo) and f(hi) have the same sign or either is NaN
 * @example
 * brentRoot((x) => x * x - 2, 0, 2); // => 1.4142135623730951 (√2, to 1e-15)
 */
export function brentRoot(
  f: (x: number) => number,
  lo: number,
  hi: number,
  tolerance = 0,
  maxIterations = 200,
): number {
  let a = lo;
  let b = hi;
  let fa = f(a);
  let fb = f(b);
  if (Number.isNaN(fa) || Number.isNaN(fb) || (fa > 0 && fb > 0) || (fa < 0 && fb < 0)) {
    throw new RangeError(`brentRoot: f(lo) and f(hi) must have opposite signs, got f(${lo}) = ${fa} and f(${hi}) = ${fb}`);
  }
  if (fa === 0) return a;
  if (fb === 0) return b;
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (let i = 0; i < maxIterations; i++) {
    if ((fb > 0 && fc > 0) || (fb < 0 && fc < 0)) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = 2 * Number.EPSILON * Math.abs(b) + tolerance;
    const m = 0.5 * (c - b);
    if (Math.abs(m) <= tol || fb === 0) return b;
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      let p: number;
      let q: number;
      const s = fb / fa;
      if (a === c) {
        p = 2 * m * s; // secant
        q = 1 - s;
      } else {
        const qa = fa / fc; // inverse quadratic interpolation
        const r = fb / fc;
        p = s * (2 * m * qa * (qa - r) - (b - a) * (r - 1));
        q = (qa - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * m * q - Math.abs(tol * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = m; // bisection
        e = m;
      }
    } else {
      d = m;
      e = m;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : m > 0 ? tol : -tol;
    fb = f(b);
  }
  return b;
}
