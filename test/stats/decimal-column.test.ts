// Scanning a decimal in place (a range of a larger text) and centring from stored scans. The reference for
// both is the substring path they replace: scanDecimal of the substring and centerDecimals of the texts,
// which center-decimals.test.ts checks against hand-computed decimal differences and NIST StRD SmLs09
// (/work/shared/reference/nist-strd-anova/SmLs09.dat). Equality is bit for bit (Object.is on every value).

import assert from "node:assert/strict";
import fc from "fast-check";

import { centerDecimalColumn, centerDecimals, decimalColumn, decimalValue, storeDecimal, storePlainDecimal } from "../../server/src/stats/decimal/center-decimals.js";
import { emptyScan, rangeReason, scanDecimal, scanValue, significantDigits } from "../../server/src/stats/decimal/parse-decimal.js";

/** Decimal texts as users type them: signs, leading and trailing zeros, points, exponents; short and long. */
const decimalText = fc
  .tuple(
    fc.constantFrom("", "-", "+"),
    fc.stringMatching(/^[0-9]{0,22}$/),
    fc.option(fc.stringMatching(/^[0-9]{0,22}$/), { nil: undefined }),
    fc.option(fc.tuple(fc.constantFrom("e", "E"), fc.constantFrom("", "-", "+"), fc.integer({ min: 0, max: 40 })), { nil: undefined }),
  )
  .map(([sign, whole, fraction, exp]) => `${sign}${whole}${fraction !== undefined ? `.${fraction}` : ""}${exp ? `${exp[0]}${exp[1]}${exp[2]}` : ""}`);

/** Texts that are mostly not numbers: the error sentences must match too. */
const anyText = fc.oneof(decimalText, fc.stringMatching(/^[-+.eE0-9a?x ]{0,8}$/));

describe("scanDecimal over a range", () => {
  it("equals scanning the substring, with digit positions shifted by the range start (property test)", () => {
    fc.assert(
      fc.property(anyText, fc.string({ maxLength: 5 }), fc.string({ maxLength: 5 }), (text, before, after) => {
        const whole = before + text + after;
        const start = before.length;
        const alone = scanDecimal(text, emptyScan());
        const inPlace = scanDecimal(whole, emptyScan(), start, start + text.length);
        if (typeof alone === "string") {
          assert.equal(inPlace, alone);
          return;
        }
        assert.ok(typeof inPlace !== "string");
        assert.equal(inPlace.negative, alone.negative);
        assert.ok(Object.is(inPlace.mantissa, alone.mantissa));
        assert.equal(inPlace.significantCount, alone.significantCount);
        assert.equal(inPlace.exponent, alone.exponent);
        assert.equal(inPlace.firstDigit, alone.firstDigit < 0 ? -1 : alone.firstDigit + start);
        assert.equal(inPlace.lastDigitEnd, alone.lastDigitEnd < 0 ? -1 : alone.lastDigitEnd + start);
        assert.equal(significantDigits(whole, inPlace), significantDigits(text, alone));
        assert.ok(Object.is(scanValue(whole, inPlace), scanValue(text, alone)));
      }),
      { numRuns: 3000 },
    );
  });

  it("reads a cell in the middle of a row without its neighbours", () => {
    const row = "r7 a2 b1 | -0012.50e1 | 3";
    const start = row.indexOf("-");
    const scan = scanDecimal(row, emptyScan(), start, start + "-0012.50e1".length);
    assert.ok(typeof scan !== "string");
    // -0012.50e1 = -125: digits "125", exponent 0 (the trailing zero after the point is not significant).
    assert.equal(scanValue(row, scan), -125);
    assert.equal(significantDigits(row, scan), "125");
    assert.equal(scanDecimal(row, emptyScan(), 3, 3), "the text is empty");
  });
});

/** Centres `texts` both ways and asserts the same outcome, bit for bit. */
function assertSameCentring(texts: readonly string[], rows?: readonly number[]): void {
  const column = decimalColumn(texts.length);
  const scan = emptyScan();
  const valid: number[] = [];
  texts.forEach((text, i) => {
    const scanned = scanDecimal(text, scan);
    if (typeof scanned === "string") return;
    const value = scanValue(text, scan);
    if (rangeReason(text, scan, value) !== undefined) return;
    storeDecimal(column, i, scan);
    assert.ok(Object.is(decimalValue(column, i, (row) => texts[row]!), value), `stored value of ${text}`);
    valid.push(i);
  });
  const selected = rows ?? valid;
  const expected = centerDecimals(selected.map((i) => texts[i]!));
  const actual = centerDecimalColumn(column, selected, (i) => texts[i]!);
  assert.equal(actual.ok, expected.ok);
  if (!actual.ok || !expected.ok) {
    assert.deepEqual(actual, expected);
    return;
  }
  assert.equal(actual.offsetText, expected.offsetText);
  assert.ok(Object.is(actual.offset, expected.offset));
  assert.equal(actual.values.length, expected.values.length);
  for (let i = 0; i < expected.values.length; i++) {
    assert.ok(Object.is(actual.values[i], expected.values[i]), `value ${i} (${texts[selected[i]!]}): ${actual.values[i]} vs ${expected.values[i]}`);
  }
}

describe("centerDecimalColumn", () => {
  it("equals centerDecimals bit for bit on NIST StRD SmLs07-style data (13 constant leading digits)", () => {
    const texts: string[] = [];
    for (let i = 0; i < 200; i++) texts.push(`1000000000000.${(i * 7) % 10}`, `1000000000000.${(i * 3) % 10}5`);
    assertSameCentring(texts);
  });

  it("equals centerDecimals on the BigInt fallback: more than 15 digits, scales beyond 10^22, huge exponents", () => {
    assertSameCentring(["12345678901234567890.123", "12345678901234567890.124", "-98765432109876543210"]);
    assertSameCentring(["1e-30", "3e-30", "2.5e-31", "0"]);
    assertSameCentring(["1e300", "-1e300", "7"]);
    assertSameCentring(["1.7976931348623157e308", "-1.7976931348623157e308"]);
    assertSameCentring(["0.1234567890123456789", "0.1234567890123456788"]);
    assertSameCentring(["5", "5", "5.0", "-0"]);
    assertSameCentring([]);
  });

  it("equals centerDecimals on a selection of rows (the measured runs of a response)", () => {
    const texts = ["21.74", "bad", "21.06", "?", "1e-40", "21.00", "22.78"];
    assertSameCentring(texts, [0, 2, 5, 6]);
    assertSameCentring(texts, [4, 0]);
  });

  it("equals centerDecimals on random decimal texts (property test)", () => {
    fc.assert(fc.property(fc.array(decimalText, { maxLength: 40 }), (texts) => assertSameCentring(texts)), { numRuns: 2000 });
    // Values sharing leading digits, as measured data do, so that offsets and differences are exercised.
    const shared = fc
      .tuple(fc.stringMatching(/^[1-9][0-9]{0,18}$/), fc.array(fc.stringMatching(/^[0-9]{1,6}$/), { minLength: 1, maxLength: 30 }), fc.integer({ min: -30, max: 30 }))
      .map(([lead, tails, exp]) => tails.map((t) => `${lead}.${t}e${exp}`));
    fc.assert(fc.property(shared, (texts) => assertSameCentring(texts)), { numRuns: 2000 });
  });
});

describe("storePlainDecimal", () => {
  // What the one-pass reader stores must be what storeDecimal stores for the full scan (whose doubles are
  // checked against Number(text) above): the same mantissa (with -0 for "-0") and exponent.
  const plain = ["21.74", "0", "-0", "+7", "7.", ".5", "0.50", "100", "-1200.0300", "0.000000000000000000001", "123456789012345", "1", "-.25", "000.010"];
  const other = ["", "?", ".", "-", "+", "1e5", "1.2.3", "12a", "1234567890123456", "10000000000000000000000000", "0.00000000000000000000001", "'x'"];
  it("stores exactly what storeDecimal stores for a plain decimal", () => {
    for (const text of plain) {
      const expected = decimalColumn(1);
      storeDecimal(expected, 0, scanDecimal(text) as ReturnType<typeof emptyScan>);
      const actual = decimalColumn(1);
      assert.equal(storePlainDecimal(`  ${text} `, 2, 2 + text.length, actual, 0), true, text);
      assert.ok(Object.is(actual.mantissa[0], expected.mantissa[0]), `${text} mantissa ${actual.mantissa[0]} vs ${expected.mantissa[0]}`);
      assert.equal(actual.exponent[0], expected.exponent[0], `${text} exponent`);
    }
  });
  it("declines (storing nothing) what needs the full scan", () => {
    for (const text of other) {
      const column = decimalColumn(1);
      assert.equal(storePlainDecimal(text, 0, text.length, column, 0), false, text);
      assert.equal(column.exponent[0], 0);
      assert.ok(Object.is(column.mantissa[0], 0));
    }
  });
  it("agrees with the full scan on random decimal texts (property test)", () => {
    fc.assert(
      fc.property(fc.stringMatching(/^[+-]?[0-9]{0,9}(\.[0-9]{0,9})?$/), (text) => {
        const actual = decimalColumn(1);
        const stored = storePlainDecimal(text, 0, text.length, actual, 0);
        const scan = scanDecimal(text);
        if (!stored) return;
        assert.notEqual(typeof scan, "string", text);
        const expected = decimalColumn(1);
        storeDecimal(expected, 0, scan as ReturnType<typeof emptyScan>);
        assert.ok(Object.is(actual.mantissa[0], expected.mantissa[0]), text);
        assert.equal(actual.exponent[0], expected.exponent[0], text);
      }),
      { numRuns: 2000 },
    );
  });
});
