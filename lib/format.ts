/**
 * Numbers as the UI shows them: a few significant figures, exponent form outside [0.01, 10 000), and the
 * unit after a no-break space so it never wraps away from its value (`3.2e-4`, `12.5 rad/s`, `0.8 %`).
 * Exponents are written without `+` or leading zeros (`1.5e6`, not `1.50e+06`) because the figures sit in
 * narrow monospace columns. ASCII `-` is used for minus so a copied figure pastes into a calculator.
 */

/** U+00A0: keeps a unit on the same line as its number. */
export const UNIT_SPACE = '\u00a0';
/** U+202F narrow no-break space: groups of three digits in large counts (SI brochure style). */
export const GROUP_SPACE = '\u202f';

export interface NumberFormat {
  /** significant figures, 1..15; default 3 */
  readonly significant?: number;
}

const FIXED_LOW = 1e-2;
const FIXED_HIGH = 1e4;

function significantOf(opts?: NumberFormat): number {
  const s = opts?.significant ?? 3;
  if (!Number.isInteger(s) || s < 1 || s > 15) {
    throw new RangeError(`significant must be an integer from 1 to 15 (got ${String(s)})`);
  }
  return s;
}

function trimFraction(text: string): string {
  return text.includes('.') ? text.replace(/\.?0+$/, '') : text;
}

export function formatNumber(x: number, opts?: NumberFormat): string {
  const sig = significantOf(opts);
  if (Number.isNaN(x)) return '—';
  if (x === Infinity) return '∞';
  if (x === -Infinity) return '-∞';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= FIXED_LOW && a < FIXED_HIGH) {
    const exponent = Math.floor(Math.log10(a));
    const decimals = Math.max(0, sig - 1 - exponent);
    const text = trimFraction(x.toFixed(decimals));
    // toFixed can round to a longer number (9999.7 → "10000"); that is still the right value.
    return text === '-0' ? '0' : text;
  }
  const [mantissa, exp] = x.toExponential(sig - 1).split('e');
  return `${trimFraction(mantissa)}e${Number(exp)}`;
}

export function withUnit(value: string, unit: string): string {
  return unit === '' ? value : `${value}${UNIT_SPACE}${unit}`;
}

/** Angular frequency in rad per model time unit (rad/s for models in seconds). */
export function frequencyUnit(timeBase = 's'): string {
  return `rad/${timeBase}`;
}

export function formatFrequency(w: number, timeBase = 's', opts?: NumberFormat): string {
  return withUnit(formatNumber(w, opts), frequencyUnit(timeBase));
}

export function formatTime(t: number, timeBase = 's', opts?: NumberFormat): string {
  return withUnit(formatNumber(t, opts), timeBase);
}

/** `fraction` is a ratio (0.008), shown as a percentage (`0.8 %`). */
export function formatPercent(fraction: number, opts?: NumberFormat): string {
  return withUnit(formatNumber(fraction * 100, opts), '%');
}

export function formatDecibel(db: number, opts?: NumberFormat): string {
  return withUnit(formatNumber(db, opts), 'dB');
}

/** Plane angle: the degree sign follows the number without a space (BIPM SI Brochure, 9th ed. 2019, §5.4.3; cited from memory). */
export function formatDegrees(deg: number, opts?: NumberFormat): string {
  return `${formatNumber(deg, opts)}°`;
}

/** Wall time given in milliseconds, shown in µs, ms or s, whichever keeps the number readable. */
export function formatWallTime(ms: number, opts?: NumberFormat): string {
  if (!Number.isFinite(ms)) return formatNumber(ms, opts);
  const a = Math.abs(ms);
  if (a !== 0 && a < 1) return withUnit(formatNumber(ms * 1000, opts), 'µs');
  if (a < 1000) return withUnit(formatNumber(ms, opts), 'ms');
  return withUnit(formatNumber(ms / 1000, opts), 's');
}

/** Whole counts (steps, points stored): every digit kept, grouped by three from 10 000 up. */
export function formatCount(n: number): string {
  if (!Number.isFinite(n)) return formatNumber(n);
  const rounded = Math.round(n);
  const digits = String(Math.abs(rounded));
  const sign = rounded < 0 ? '-' : '';
  if (digits.length <= 4) return sign + digits;
  return sign + digits.replace(/\B(?=(\d{3})+(?!\d))/g, GROUP_SPACE);
}

/** A ratio such as a cost saving: `12×`, `3.5e3×`. */
export function formatFactor(x: number, opts?: NumberFormat): string {
  return `${formatNumber(x, opts)}×`;
}

/**
 * A pole or other complex number, engineering `j`. With `pair: true` the conjugate pair is written once
 * (`-0.5 ± 12.3j`).
 */
export function formatComplex(re: number, im: number, opts?: NumberFormat & { pair?: boolean }): string {
  if (im === 0 || Number.isNaN(im)) return formatNumber(re, opts);
  const imag = `${formatNumber(Math.abs(im), opts)}j`;
  if (opts?.pair) return `${formatNumber(re, opts)} ± ${imag}`;
  if (re === 0) return im < 0 ? `-${imag}` : imag;
  return `${formatNumber(re, opts)} ${im < 0 ? '-' : '+'} ${imag}`;
}

/** Null/undefined figures are "not computed", shown as an em dash rather than a misleading zero. */
export function formatOptional(x: number | null | undefined, format: (v: number) => string): string {
  return x === null || x === undefined ? '—' : format(x);
}
