/**
 * Number formatting for every renderer, in one place. The report holds fractions (0.07); text and
 * markdown show percentage points (7.0). Missing values (null, NaN, ±Infinity) show as {@link NULL_MARK}.
 */

/** What a missing value looks like in text and markdown. */
export const NULL_MARK = '—';

function missing(x: number | null | undefined): x is null | undefined {
  return x === null || x === undefined || !Number.isFinite(x);
}

/** toFixed without a minus sign on values that round to zero. */
function fixed(x: number, digits: number): string {
  const s = x.toFixed(digits);
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s;
}

/**
 * A fraction as percentage points.
 * @param fraction e.g. 0.07
 * @param digits decimals (default 1)
 * @returns `'7.0'`, or `—` when missing
 * @example
 * points(0.07); // => '7.0'
 */
export function points(fraction: number | null | undefined, digits = 1): string {
  return missing(fraction) ? NULL_MARK : fixed(fraction * 100, digits);
}

/**
 * A gap as signed percentage points, with an ASCII sign; a value that rounds to zero has no sign.
 * @param fraction e.g. -0.005
 * @param digits decimals (default 1)
 * @returns `'+7.0'`, `'-0.5'`, `'0.0'`, or `—` when missing
 * @example
 * signedPoints(0.07); // => '+7.0'
 */
export function signedPoints(fraction: number | null | undefined, digits = 1): string {
  if (missing(fraction)) return NULL_MARK;
  const s = fixed(fraction * 100, digits);
  return s.startsWith('-') || /^0\.?0*$/.test(s) ? s : `+${s}`;
}

/**
 * A fraction as a percentage with the `%` sign.
 * @param fraction e.g. 0.25
 * @param digits decimals (default 1)
 * @returns `'25.0%'`, or `—` when missing
 * @example
 * percent(0.25); // => '25.0%'
 */
export function percent(fraction: number | null | undefined, digits = 1): string {
  return missing(fraction) ? NULL_MARK : `${fixed(fraction * 100, digits)}%`;
}

/**
 * An interval in percentage points, `[lo, hi]`; signed when it is the interval of a gap.
 * @param lo lower bound (fraction)
 * @param hi upper bound (fraction)
 * @param signed show signs (for gaps)
 * @returns `'[4.7, 5.5]'`, or `—` when either bound is missing
 * @example
 * pointsInterval(-0.004, 0.012, true); // => '[-0.4, +1.2]'
 */
export function pointsInterval(lo: number | null | undefined, hi: number | null | undefined, signed = false): string {
  if (missing(lo) || missing(hi)) return NULL_MARK;
  const f = signed ? signedPoints : points;
  return `[${f(lo)}, ${f(hi)}]`;
}

/**
 * A p-value or q-value: three decimals, `<0.001` below that.
 * @param p a probability
 * @returns `'0.032'`, `'<0.001'`, or `—` when missing
 * @example
 * pValue(0.0004); // => '<0.001'
 */
export function pValue(p: number | null | undefined): string {
  if (missing(p)) return NULL_MARK;
  if (p < 0.001) return '<0.001';
  return Math.min(1, p).toFixed(3);
}

/**
 * A count with thousands separators (comma), rounded to a whole number.
 * @param n a count of rows
 * @returns `'12,345'`, or `—` when missing
 * @example
 * count(12345); // => '12,345'
 */
export function count(n: number | null | undefined): string {
  if (missing(n)) return NULL_MARK;
  const rounded = Math.round(n);
  const digits = Math.abs(rounded).toString();
  const grouped = digits.replace(/\B(?=(\d{3})+$)/g, ',');
  return rounded < 0 ? `-${grouped}` : grouped;
}

/**
 * A file size in decimal units (B, kB, MB, GB, TB).
 * @param n bytes
 * @returns `'1.2 MB'`, or `—` when missing
 * @example
 * bytes(1_234_567); // => '1.2 MB'
 */
export function bytes(n: number | null | undefined): string {
  if (missing(n)) return NULL_MARK;
  if (Math.abs(n) < 1000) return `${Math.round(n)} B`;
  const units = ['kB', 'MB', 'GB', 'TB'];
  let value = n / 1000;
  let unit = 0;
  while (Math.abs(value) >= 999.95 && unit < units.length - 1) {
    value /= 1000;
    unit++;
  }
  return `${value.toFixed(1)} ${units[unit]}`;
}

/**
 * A number exactly as stored, for machine-readable output (CSV): the shortest string that reads back
 * to the same double, or the empty string when missing.
 * @param n any number
 * @returns e.g. `'0.07'`, `''` for null and non-finite values
 * @example
 * plainNumber(0.07); // => '0.07'
 */
export function plainNumber(n: number | null | undefined): string {
  return missing(n) ? '' : String(n);
}

/**
 * A confidence level or rate as a short percentage, without trailing zeros.
 * @param fraction e.g. 0.95
 * @returns `'95%'`, `'99.5%'`
 * @example
 * levelPercent(0.95); // => '95%'
 */
export function levelPercent(fraction: number): string {
  return Number.isFinite(fraction) ? `${Number((fraction * 100).toFixed(2))}%` : NULL_MARK;
}
