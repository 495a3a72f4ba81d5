/**
 * Exact decimal centering of data typed as decimal text.
 *
 * Why: data such as 1000000000000.4, 1000000000000.3, ... (13 constant leading digits, as in the NIST
 * StRD SmLs07-09 sets) lose their varying digits as soon as they become doubles. Subtracting an offset
 * exactly in decimal first, then converting each difference once, leaves values such as 0.4 - 0.3 that
 * carry the full precision of a double, so the later floating-point arithmetic is accurate.
 *
 * Offset choice: the midpoint of the data's range, rounded to the power of ten 10^k just below the range
 * (k = floor(log10(max - min))), computed from approximate doubles. It is a short decimal (no digits
 * below the range's own order of magnitude, so never finer than the data), and every centered value is
 * at most about the range in magnitude, which is what keeps sums of squares accurate. Being a rounded
 * midpoint it is independent of row order, unlike the first value. When all values are equal it is
 * that value itself, and the centered values are all exactly 0. Only the choice uses approximations;
 * each difference x_i - offset is exact.
 *
 * Arithmetic: every value and the offset are scaled to integers at the finest decimal scale E present.
 * When a scaled integer and the difference are below 2^53 the subtraction is exact in doubles and the
 * single multiplication or division by 10^|E| (|E| <= 22) is correctly rounded (Clinger 1990); otherwise
 * that value is done with BigInt and converted by the engine's correctly rounded decimal-string parser.
 */

import {
  EXACT_POWERS_OF_TEN,
  rangeReason,
  scanDecimal,
  scanValue,
  significantDigits,
  emptyScan,
  type DecimalScan,
} from "./parse-decimal.js";

/** Result of {@link centerDecimals}. */
export type CenterDecimalsResult =
  | {
      readonly ok: true;
      /** The offset as a canonical decimal text (for example "1000000000000.4"). */
      readonly offsetText: string;
      /** The double nearest to the offset. */
      readonly offset: number;
      /** values[i] is the double nearest to the exact decimal difference texts[i] - offset. */
      readonly values: Float64Array;
      /** The largest magnitude among `values` (0 when there are none), found as they are computed. */
      readonly largestMagnitude: number;
    }
  | {
      readonly ok: false;
      /** Index of the first text that could not be used. */
      readonly index: number;
      /** A sentence saying why. */
      readonly reason: string;
    };

const TWO_POW_53 = 9007199254740992;

/**
 * Decimal numbers already scanned and validated, stored column-wise (one entry per value, no object per
 * value): what a caller that checked every value once (the model builder) keeps so that centring does not
 * read the texts again. Nine bytes per value: most measured values have at most 15 significant digits and
 * a power of ten within ±22, so they are the signed integer `mantissa` times 10^`exponent`, and their
 * double is one correctly rounded operation away (Clinger 1990). The others are marked
 * `EXPONENT_FROM_TEXT` and read from their text when needed. Fill it with {@link storeDecimal}.
 */
export interface DecimalColumn {
  /** ±(the significant digits as an exact integer), with the written sign (-0 for "-0"); 0 for zero. */
  readonly mantissa: Float64Array;
  /** Power of ten of the last significant digit (`DecimalScan.exponent`), or `EXPONENT_FROM_TEXT`. */
  readonly exponent: Int8Array;
}

/** `DecimalColumn.exponent` of a value kept only as its text (more than 15 digits or beyond 10^±22). */
export const EXPONENT_FROM_TEXT = -128;

/**
 * The first pass of `centerDecimalColumn` over a set of rows, made elsewhere (the plain-table reader
 * counts it as it reads): per stored exponent e (entry e + 22) where `present`, the smallest and largest
 * mantissa among the rows' values in row order (a strict comparison, so the first zero met keeps its
 * sign); and the smallest exponent of a nonzero value (null: none). Only for rows of which none is kept
 * as text. Plain finite numbers, as all of the design is.
 */
export interface DecimalExtremes {
  readonly present: Uint8Array;
  readonly lowest: Float64Array;
  readonly highest: Float64Array;
  readonly scale: number | null;
}

/** A column of `length` decimals, all zero until stored. */
export function decimalColumn(length: number): DecimalColumn {
  return { mantissa: new Float64Array(length), exponent: new Int8Array(length) };
}

/** Stores a successful scan of a value in range (see `rangeReason`) at `index`. */
export function storeDecimal(column: DecimalColumn, index: number, scan: DecimalScan): void {
  if (scan.significantCount > 15 || scan.exponent > 22 || scan.exponent < -22) {
    column.mantissa[index] = 0;
    column.exponent[index] = EXPONENT_FROM_TEXT;
    return;
  }
  column.mantissa[index] = scan.negative ? -scan.mantissa : scan.mantissa;
  column.exponent[index] = scan.significantCount === 0 ? 0 : scan.exponent;
}

/**
 * Stores the decimal written in `text[start, end)` at `index` when it is a plain one (an optional sign,
 * digits with at most one decimal point, no exponent, at most 15 significant digits and a last significant
 * digit within 10^±22) and returns true: exactly what `storeDecimal` of its `scanDecimal` stores, in one
 * pass without a scan record. Returns false, storing nothing, for anything else (then scan it in full).
 * Such a value is always a usable, finite, nonzero-or-zero double, so no range check is needed.
 */
export function storePlainDecimal(text: string, start: number, end: number, column: DecimalColumn, index: number): boolean {
  let i = start;
  if (i >= end) return false;
  let negative = false;
  const first = text.charCodeAt(i);
  if (first === 43 /* + */ || first === 45 /* - */) {
    negative = first === 45;
    i++;
  }
  let mantissa = 0;
  let significant = 0;
  let pendingZeros = 0;
  let fractionDigits = 0;
  let digits = 0;
  let afterPoint = false;
  for (; i < end; i++) {
    const code = text.charCodeAt(i);
    if (code === 46 /* . */) {
      if (afterPoint) return false;
      afterPoint = true;
      continue;
    }
    const digit = code - 48;
    if (digit < 0 || digit > 9) return false;
    digits++;
    if (afterPoint) fractionDigits++;
    if (digit === 0) {
      // Leading zeros are skipped; others are held back until a nonzero digit shows they are not trailing.
      if (significant > 0) pendingZeros++;
      continue;
    }
    for (let z = 0; z < pendingZeros; z++) mantissa *= 10;
    mantissa = mantissa * 10 + digit;
    significant += pendingZeros + 1;
    pendingZeros = 0;
  }
  if (digits === 0 || significant > 15) return false;
  const exponent = significant === 0 ? 0 : pendingZeros - fractionDigits;
  if (exponent > 22 || exponent < -22) return false;
  column.mantissa[index] = negative ? -mantissa : mantissa;
  column.exponent[index] = exponent;
  return true;
}

/**
 * The double nearest to stored value `row` (the same as `scanValue` of its text); `textOf(row)` is read
 * only for a value marked `EXPONENT_FROM_TEXT`.
 */
export function decimalValue(column: DecimalColumn, row: number, textOf: (row: number) => string): number {
  const e = column.exponent[row]!;
  if (e === EXPONENT_FROM_TEXT) return textValue(textOf(row));
  const m = column.mantissa[row]!;
  return e >= 0 ? m * EXACT_POWERS_OF_TEN[e] : m / EXACT_POWERS_OF_TEN[-e];
}

const textScan = emptyScan();

/** The double of a text already known to be a valid decimal in range. */
function textValue(text: string): number {
  return scanValue(text, scanDecimal(text, textScan) as DecimalScan);
}

/**
 * Centers decimal texts exactly: picks a short decimal offset near the middle of the data and returns,
 * for each text, the double nearest to (value - offset) computed exactly in decimal before the one
 * conversion. Fails with the index of the first text that is not a decimal number (see parseDecimal
 * for the syntax) or whose magnitude no finite double can represent. An empty input gives offset 0.
 * Never throws.
 */
export function centerDecimals(texts: readonly string[]): CenterDecimalsResult {
  const n = texts.length;
  // Scan results live in typed arrays (one reused scan record), so a million rows allocate no objects.
  const column = decimalColumn(n);
  const scan = emptyScan();
  for (let i = 0; i < n; i++) {
    const scanned = scanDecimal(texts[i], scan);
    if (typeof scanned === "string") return { ok: false, index: i, reason: scanned };
    const value = scanValue(texts[i], scan);
    const problem = rangeReason(texts[i], scan, value);
    if (problem !== undefined) return { ok: false, index: i, reason: problem };
    storeDecimal(column, i, scan);
  }
  const all = new Array<number>(n).fill(0);
  for (let i = 0; i < n; i++) all[i] = i;
  return centerDecimalColumn(column, all, (i) => texts[i]);
}

/**
 * As {@link centerDecimals}, for the entries `rows` of a column of values scanned earlier: the same offset
 * and, bit for bit, the same centred values as centring their texts. `textOf(row)` gives a value's text as
 * written; it is read only where exact integer arithmetic in doubles does not suffice (more than 15
 * significant digits or a scale beyond 10^22: the BigInt path), for the offset when all values are equal,
 * and for a failure's sentence. A failure's `index` is a position in `rows`. `extremes`, when given,
 * is this function's first pass over `rows`, made elsewhere (see `DecimalExtremes`); it is not redone.
 * `memory` gives the centred values' buffer (shared memory when another thread will read them).
 */
export function centerDecimalColumn(
  column: DecimalColumn,
  rows: ArrayLike<number>,
  textOf: (row: number) => string,
  extremes?: DecimalExtremes,
  memory: (bytes: number) => ArrayBufferLike = (bytes) => new ArrayBuffer(bytes),
): CenterDecimalsResult {
  const n = rows.length;
  const { mantissa, exponent } = column;
  let min = Infinity;
  let max = -Infinity;
  let scale = Infinity;
  const scan = emptyScan();
  // The smallest and largest mantissa per stored exponent (-22..22) instead of each value's double: the
  // conversion is correctly rounded, hence monotone in the mantissa for a given exponent, and values of
  // different exponents convert in the order of their exact values, so the doubles of these extremes give
  // the same min and max as converting every value (zeros, the only values whose sign could differ, all
  // have exponent 0 and keep the first-seen sign as before). One division per exponent, not per value.
  const lowest = new Float64Array(45).fill(Infinity);
  const highest = new Float64Array(45).fill(-Infinity);
  if (extremes) {
    for (let k = 0; k < 45; k++) {
      if (extremes.present[k] === 0) continue;
      lowest[k] = extremes.lowest[k]!;
      highest[k] = extremes.highest[k]!;
    }
    scale = extremes.scale ?? Infinity;
  } else for (let i = 0; i < n; i++) {
    const row = rows[i]!;
    const e = exponent[row]!;
    if (e !== EXPONENT_FROM_TEXT) {
      const m = mantissa[row]!;
      const k = e + 22;
      if (m < lowest[k]!) lowest[k] = m;
      if (m > highest[k]!) highest[k] = m;
      if (m !== 0 && e < scale) scale = e;
    } else {
      const text = textOf(row);
      scanDecimal(text, scan);
      const value = scanValue(text, scan);
      if (scan.significantCount > 0 && scan.exponent < scale) scale = scan.exponent;
      if (value < min) min = value;
      if (value > max) max = value;
    }
  }
  for (let k = 0; k < 45; k++) {
    if (lowest[k] === Infinity) continue;
    const e = k - 22;
    const low = e >= 0 ? lowest[k]! * EXACT_POWERS_OF_TEN[e]! : lowest[k]! / EXACT_POWERS_OF_TEN[-e]!;
    const high = e >= 0 ? highest[k]! * EXACT_POWERS_OF_TEN[e]! : highest[k]! / EXACT_POWERS_OF_TEN[-e]!;
    if (low < min) min = low;
    if (high > max) max = high;
  }
  const offset = chooseOffset(n > 0 ? () => storedDecimal(column, rows[0]!, textOf) : undefined, min, max);
  const offsetText = formatDecimal(offset.negative, offset.digits, offset.exponent);
  if (offset.digits !== "" && offset.exponent < scale) scale = offset.exponent;
  if (scale === Infinity) scale = 0;

  const offsetScaled = scaledNumber(offset.negative, offset.mantissa, offset.digits.length, offset.exponent - scale);
  const fastScale = Math.abs(scale) <= 22 && !Number.isNaN(offsetScaled);
  const power = fastScale ? EXACT_POWERS_OF_TEN[Math.abs(scale)] : NaN;
  const values = new Float64Array(memory(n * 8));
  let offsetBig: bigint | undefined;
  let largest = 0;
  for (let i = 0; i < n; i++) {
    const row = rows[i]!;
    let result = NaN;
    if (fastScale) {
      // ±mantissa × 10^shift as an exact double integer (scaledNumber, inlined for the common case). A
      // value kept as text goes to the exact BigInt path below, which rounds to the same nearest double.
      const m = mantissa[row]!;
      const e = exponent[row]!;
      const shift = e - scale;
      let scaled = NaN;
      if (e === EXPONENT_FROM_TEXT) scaled = NaN;
      else if (m === 0) scaled = 0;
      else if (shift <= 22) {
        const product = m * EXACT_POWERS_OF_TEN[shift];
        if (Math.abs(product) < TWO_POW_53) scaled = product;
      }
      if (!Number.isNaN(scaled)) {
        const difference = scaled - offsetScaled;
        if (difference === 0) result = 0;
        else if (Math.abs(difference) < TWO_POW_53) result = scale >= 0 ? difference * power : difference / power;
      }
    }
    if (Number.isNaN(result)) {
      offsetBig ??= scaledBigInt(offset.negative, offset.digits, offset.exponent - scale);
      const text = textOf(row);
      scanDecimal(text, scan);
      const difference = scaledBigInt(scan.negative, significantDigits(text, scan), scan.exponent - scale) - offsetBig;
      result = difference === 0n ? 0 : Number(`${difference}e${scale}`);
    }
    if (!Number.isFinite(result)) {
      return { ok: false, index: i, reason: `${textOf(row)} minus the offset ${offsetText} is too large for a finite double` };
    }
    values[i] = result;
    const magnitude = Math.abs(result);
    if (magnitude > largest) largest = magnitude;
  }
  return { ok: true, offsetText, offset: Number(offsetText), values, largestMagnitude: largest };
}

interface Offset {
  readonly negative: boolean;
  readonly digits: string;
  readonly mantissa: number;
  readonly exponent: number;
}

const ZERO_OFFSET: Offset = { negative: false, digits: "", mantissa: 0, exponent: 0 };

/**
 * Stored value `row` as exact digits and exponent: from the column where it holds the value (its mantissa
 * is the significant digits, with no trailing zero), else from the text.
 */
function storedDecimal(column: DecimalColumn, row: number, textOf: (row: number) => string): Offset {
  const e = column.exponent[row]!;
  const m = column.mantissa[row]!;
  if (e !== EXPONENT_FROM_TEXT) return m === 0 ? ZERO_OFFSET : { negative: m < 0, digits: String(Math.abs(m)), mantissa: Math.abs(m), exponent: e };
  const text = textOf(row);
  const scan = scanDecimal(text) as DecimalScan;
  const digits = significantDigits(text, scan);
  return digits === "" ? ZERO_OFFSET : { negative: scan.negative, digits, mantissa: scan.mantissa, exponent: scan.exponent };
}

/**
 * The rounded midpoint described in the module comment, as exact digits and exponent. `first` gives the
 * first value's (asked for only when every value is equal: then it is the offset).
 */
function chooseOffset(first: (() => Offset) | undefined, min: number, max: number): Offset {
  const zero = ZERO_OFFSET;
  if (first === undefined) return zero;
  const range = max - min;
  if (range === 0) return first();
  if (!Number.isFinite(range)) return zero;
  const k = Math.floor(Math.log10(range));
  const middle = min / 2 + max / 2;
  const quantum = Math.pow(10, k);
  const units = Math.round(middle / quantum);
  if (units === 0 || !Number.isFinite(units)) return zero;
  let digits = BigInt(Math.abs(units)).toString();
  let exponent = k;
  let end = digits.length;
  while (digits.charCodeAt(end - 1) === 48) end--;
  exponent += digits.length - end;
  digits = digits.slice(0, end);
  const mantissa = digits.length <= 15 ? Number(digits) : NaN;
  return { negative: units < 0, digits, mantissa, exponent };
}

/**
 * ±mantissa × 10^shift as an exact double integer, or NaN when that is not guaranteed (more than 15
 * significant digits, a shift beyond 10^22, or a product of 2^53 or more).
 */
function scaledNumber(negative: boolean, mantissa: number, significantCount: number, shift: number): number {
  if (significantCount === 0) return 0;
  if (significantCount > 15 || shift > 22 || Number.isNaN(mantissa)) return NaN;
  const product = mantissa * EXACT_POWERS_OF_TEN[shift];
  if (product >= TWO_POW_53) return NaN;
  return negative ? -product : product;
}

function scaledBigInt(negative: boolean, digits: string, shift: number): bigint {
  if (digits === "") return 0n;
  const magnitude = BigInt(digits) * 10n ** BigInt(shift);
  return negative ? -magnitude : magnitude;
}

/** Canonical text of ±digits × 10^exponent: plain notation for moderate exponents, else scientific. */
function formatDecimal(negative: boolean, digits: string, exponent: number): string {
  if (digits === "") return "0";
  const sign = negative ? "-" : "";
  const pointPosition = digits.length + exponent;
  if (exponent >= 0 && pointPosition <= 21) return sign + digits + "0".repeat(exponent);
  if (exponent < 0 && pointPosition > 0) return `${sign}${digits.slice(0, pointPosition)}.${digits.slice(pointPosition)}`;
  if (exponent < 0 && pointPosition > -7) return `${sign}0.${"0".repeat(-pointPosition)}${digits}`;
  const mantissa = digits.length === 1 ? digits : `${digits[0]}.${digits.slice(1)}`;
  return `${sign}${mantissa}e${pointPosition - 1}`;
}
