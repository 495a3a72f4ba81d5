/**
 * Validation and exact decomposition of a decimal number as the user typed it.
 *
 * Accepted syntax: an optional sign `+` or `-`, digits with at most one decimal point and at least one
 * digit (`7`, `7.`, `.5`, `0.50`), and an optional exponent `e` or `E` with an optional sign and at least
 * one digit. Nothing else: no spaces, no `_` separators, no hexadecimal, no `Infinity` or `NaN`.
 * The value is kept exactly as ±digits × 10^exponent with the significant digits stripped of leading
 * and trailing zeros, so later arithmetic can be exact.
 */

/** An exactly represented decimal: (negative ? -1 : 1) × digits × 10^exponent. */
export interface ParsedDecimal {
  /** Whether the text had a minus sign (also for "-0"; the value of "-0" is zero). */
  readonly negative: boolean;
  /** Significant digits without leading or trailing zeros; "" for zero. */
  readonly digits: string;
  /** Power of ten of the last significant digit; 0 for zero. */
  readonly exponent: number;
  /** The double nearest to the value (correctly rounded). */
  readonly value: number;
}

/** Why a text is not accepted: not decimal syntax, or a value no finite, nonzero double can stand for. */
export type DecimalProblem = "not-a-number" | "out-of-range";

/** Result of {@link parseDecimal}. */
export type ParseDecimalResult =
  | { readonly ok: true; readonly decimal: ParsedDecimal }
  | { readonly ok: false; readonly problem: DecimalProblem; readonly reason: string };

/**
 * Parses and validates a decimal text such as "-0.50", "1.2e-3" or "+7".
 *
 * Returns `problem: "not-a-number"` for text that is not decimal syntax, and `problem: "out-of-range"` for
 * a nonzero value whose magnitude exceeds the largest finite double (e.g. "1e400") or is so small that it
 * would round to zero (e.g. "1e-400"). Never throws.
 */
export function parseDecimal(text: string): ParseDecimalResult {
  const scan = scanDecimal(text);
  if (typeof scan === "string") return { ok: false, problem: "not-a-number", reason: scan };
  const digits = significantDigits(text, scan);
  const value = scanValue(text, scan);
  const rangeProblem = rangeReason(text, scan, value);
  if (rangeProblem !== undefined) return { ok: false, problem: "out-of-range", reason: rangeProblem };
  return { ok: true, decimal: { negative: scan.negative, digits, exponent: scan.exponent, value } };
}

/**
 * The scanner's view of one decimal text (internal to the decimal module): the significant digits as a
 * number `mantissa` (exact when `significantCount` <= 15) and where they sit in the text.
 */
export interface DecimalScan {
  negative: boolean;
  mantissa: number;
  significantCount: number;
  exponent: number;
  /** Index in the text of the first significant digit, or -1 for zero. */
  firstDigit: number;
  /** Index in the text just past the last nonzero digit. */
  lastDigitEnd: number;
}

/** A fresh scan record, for callers that scan many texts into one reused record. */
export function emptyScan(): DecimalScan {
  return { negative: false, mantissa: 0, significantCount: 0, exponent: 0, firstDigit: -1, lastDigitEnd: -1 };
}

const MAX_EXPONENT_MAGNITUDE = 1e9;

/**
 * Scans a decimal text in one pass over its character codes. Returns the scan (written into `into` when
 * given, so that a caller scanning a million texts allocates nothing), or a sentence saying why the text
 * is not a decimal number. Used by parseDecimal and centerDecimals.
 *
 * With `start` and `end`, only the range `[start, end)` of `text` is scanned, exactly as if it were the
 * substring `text.slice(start, end)`, except that `firstDigit` and `lastDigitEnd` are indices into the whole
 * `text`: a caller can then check a cell of a large document in place, without a substring per cell.
 */
export function scanDecimal(text: string, into: DecimalScan = emptyScan(), start = 0, end = text.length): DecimalScan | string {
  const length = end;
  if (length <= start) return "the text is empty";
  let i = start;
  let negative = false;
  const first = text.charCodeAt(start);
  if (first === 43 /* + */ || first === 45 /* - */) {
    negative = first === 45;
    i = start + 1;
  }
  let mantissa = 0;
  let significantCount = 0;
  let pendingZeros = 0;
  let fractionDigits = 0;
  let digitCount = 0;
  let afterPoint = false;
  let firstDigit = -1;
  let lastDigitEnd = -1;
  for (; i < length; i++) {
    const code = text.charCodeAt(i);
    if (code === 46 /* . */) {
      if (afterPoint) return "the number has two decimal points";
      afterPoint = true;
      continue;
    }
    if (code < 48 || code > 57) break;
    digitCount++;
    if (afterPoint) fractionDigits++;
    const digit = code - 48;
    if (significantCount === 0 && digit === 0) continue;
    if (digit === 0) {
      pendingZeros++;
      continue;
    }
    if (firstDigit < 0) firstDigit = i;
    // Append the zeros held back (they were not trailing after all) and this digit.
    for (let z = 0; z < pendingZeros; z++) mantissa *= 10;
    mantissa = mantissa * 10 + digit;
    significantCount += pendingZeros + 1;
    pendingZeros = 0;
    lastDigitEnd = i + 1;
  }
  if (digitCount === 0) return "a number needs at least one digit";
  let explicitExponent = 0;
  if (i < length) {
    const code = text.charCodeAt(i);
    if (code !== 101 /* e */ && code !== 69 /* E */) return `unexpected character '${text[i]}' in a number`;
    i++;
    let exponentNegative = false;
    if (i < length && (text.charCodeAt(i) === 43 || text.charCodeAt(i) === 45)) {
      exponentNegative = text.charCodeAt(i) === 45;
      i++;
    }
    let exponentDigits = 0;
    for (; i < length; i++) {
      const e = text.charCodeAt(i);
      if (e < 48 || e > 57) return `unexpected character '${text[i]}' in the exponent`;
      exponentDigits++;
      if (explicitExponent < MAX_EXPONENT_MAGNITUDE) explicitExponent = explicitExponent * 10 + (e - 48);
    }
    if (exponentDigits === 0) return "the exponent has no digits";
    if (exponentNegative) explicitExponent = -explicitExponent;
  }
  into.negative = negative;
  into.mantissa = mantissa;
  into.significantCount = significantCount;
  into.exponent = significantCount === 0 ? 0 : pendingZeros - fractionDigits + explicitExponent;
  into.firstDigit = firstDigit;
  into.lastDigitEnd = lastDigitEnd;
  return into;
}

/** The significant digits of a scanned text as a string (without the decimal point). */
export function significantDigits(text: string, scan: DecimalScan): string {
  if (scan.significantCount === 0) return "";
  const raw = text.slice(scan.firstDigit, scan.lastDigitEnd);
  return raw.indexOf(".") >= 0 ? raw.replace(".", "") : raw;
}

/** Exact powers of ten representable as doubles (10^0 ... 10^22). */
export const EXACT_POWERS_OF_TEN: readonly number[] = Array.from({ length: 23 }, (_, k) => Number(`1e${k}`));

/**
 * The double nearest to a scanned value. Uses one correctly rounded multiplication or division when the
 * mantissa is exact and the exponent is within ±22 (Clinger 1990, "How to read floating point numbers
 * accurately"), and the engine's correctly rounded decimal-string conversion otherwise.
 */
export function scanValue(text: string, scan: DecimalScan): number {
  if (scan.significantCount === 0) return scan.negative ? -0 : 0;
  let magnitude: number;
  if (scan.significantCount <= 15 && Math.abs(scan.exponent) <= 22) {
    magnitude =
      scan.exponent >= 0
        ? scan.mantissa * EXACT_POWERS_OF_TEN[scan.exponent]
        : scan.mantissa / EXACT_POWERS_OF_TEN[-scan.exponent];
  } else {
    magnitude = Number(`${significantDigits(text, scan)}e${scan.exponent}`);
  }
  return scan.negative ? -magnitude : magnitude;
}

/** A sentence if a nonzero value overflows to infinity or underflows to zero as a double. */
export function rangeReason(text: string, scan: DecimalScan, value: number): string | undefined {
  if (scan.significantCount === 0) return undefined;
  if (!Number.isFinite(value)) {
    return `${text} is larger in magnitude than the largest finite double (about 1.8e308)`;
  }
  if (value === 0) {
    return `${text} is nonzero but smaller in magnitude than the smallest positive double (about 4.9e-324)`;
  }
  return undefined;
}
