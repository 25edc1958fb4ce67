/**
 * Numbers as text for people: a few significant digits, and never a lost exponent.
 *
 * `formatNumber` gives plain decimals for magnitudes in [1e-3, 1e5) and exponent form
 * ("6.895e-10") outside it, trims trailing zeros ("1e-10", not "1.000e-10") and always returns a
 * string that `Number()` reads back (ASCII minus, `e` notation), so a typed field can show it and
 * take it again. `formatSpread` says how far apart two magnitudes are without printing absurd powers
 * (a lattice condition estimate can exceed 10^3000; double precision holds 16 digits).
 */

/** `x` with `digits` significant digits; exponent form outside [1e-3, 1e5). */
export function formatNumber(x: number, digits = 4): string {
  if (Number.isNaN(x)) return 'NaN';
  if (!Number.isFinite(x)) return x > 0 ? 'Infinity' : '-Infinity';
  if (x === 0) return '0';
  const rounded = Number(x.toPrecision(digits));
  const ra = Math.abs(rounded);
  if (ra >= 1e5 || ra < 1e-3) {
    const [mant, exp] = rounded.toExponential(digits - 1).split('e') as [string, string];
    const m = mant.includes('.') ? mant.replace(/0+$/, '').replace(/\.$/, '') : mant;
    return `${m}e${exp.startsWith('+') ? exp.slice(1) : exp}`;
  }
  return String(rounded);
}

/**
 * How many orders of magnitude a ratio spans, for messages: "about 10^12" up to 10^16, and beyond
 * that "more than 10^16 (past the 16 significant digits of double precision)". `log10Ratio` is the
 * base-10 logarithm of the ratio.
 */
export function formatSpread(log10Ratio: number): string {
  if (!Number.isFinite(log10Ratio) || log10Ratio > 16) return 'more than 10^16 (past the 16 significant digits of double precision)';
  return `about 10^${Math.max(0, Math.round(log10Ratio))}`;
}
