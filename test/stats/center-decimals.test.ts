// Exact decimal centering. Expected values are the decimal differences written out by hand and converted
// once by the engine's correctly rounded parser (Number("0.1") etc.); the NIST StRD SmLs09 structure and
// certified sums of squares are from /work/shared/reference/nist-strd-anova/SmLs09.dat (lines 41-47, 61-18069).

import assert from "node:assert/strict";

import { centerDecimals } from "../../server/src/stats/decimal/center-decimals.js";
import { parseDecimal } from "../../server/src/stats/decimal/parse-decimal.js";

function centered(texts: string[]) {
  const result = centerDecimals(texts);
  assert.ok(result.ok, `expected success, got ${JSON.stringify(result)}`);
  return result;
}

/** The 18009 responses of NIST StRD SmLs09: per treatment, its middle value, then 1000 pairs (m - 0.1, m + 0.1). */
function smls09(): { treatment: number[]; texts: string[] } {
  const middles = [4, 3, 5, 3, 5, 3, 5, 3, 5];
  const treatment: number[] = [];
  const texts: string[] = [];
  middles.forEach((m, k) => {
    treatment.push(k);
    texts.push(`1000000000000.${m}`);
    for (let i = 0; i < 1000; i++) {
      treatment.push(k, k);
      texts.push(`1000000000000.${m - 1}`, `1000000000000.${m + 1}`);
    }
  });
  return { treatment, texts };
}

describe("centerDecimals", () => {
  it("centers NIST StRD SmLs09 (13 constant leading digits) exactly", () => {
    const { treatment, texts } = smls09();
    assert.equal(texts.length, 18009);
    const result = centered(texts);
    // Range 0.2 .. 0.6 gives quantum 0.1 and the rounded midpoint 1000000000000.4.
    assert.equal(result.offsetText, "1000000000000.4");
    const expected: Record<string, number> = {
      "1000000000000.2": Number("-0.2"),
      "1000000000000.3": Number("-0.1"),
      "1000000000000.4": 0,
      "1000000000000.5": Number("0.1"),
      "1000000000000.6": Number("0.2"),
    };
    texts.forEach((text, i) => assert.equal(result.values[i], expected[text], text));

    // With the centered values, plain two-pass double arithmetic (naive summation of 18009 terms) meets the
    // certified sums of squares (between 1.60080000000000E+02, within 1.80000000000000E+02) to at least 12
    // digits, the project's accuracy bar; without centering a general package keeps 0-5 digits here.
    const sums = new Array(9).fill(0);
    const counts = new Array(9).fill(0);
    let total = 0;
    result.values.forEach((v, i) => {
      sums[treatment[i]] += v;
      counts[treatment[i]] += 1;
      total += v;
    });
    const grand = total / result.values.length;
    let between = 0;
    for (let k = 0; k < 9; k++) between += counts[k] * (sums[k] / counts[k] - grand) ** 2;
    let within = 0;
    result.values.forEach((v, i) => (within += (v - sums[treatment[i]] / counts[treatment[i]]) ** 2));
    assert.ok(Math.abs(between - 160.08) / 160.08 < 1e-12, `between SS ${between}`);
    assert.ok(Math.abs(within - 180) / 180 < 1e-12, `within SS ${within}`);
  });

  it("handles mixed scales, signs, exponents and '-0' exactly", () => {
    const result = centered(["-0.50", "1.2e-3", "+7", "-0", "0", "12.5E+1", "2.50"]);
    // Range -0.5 .. 125 gives quantum 100 and midpoint 62.25 -> offset 100.
    assert.equal(result.offsetText, "100");
    assert.deepEqual(Array.from(result.values), [
      Number("-100.5"),
      Number("-99.9988"),
      -93,
      -100,
      -100,
      25,
      Number("-97.5"),
    ]);
  });

  it("keeps full precision for 40-digit values that differ in the last digits", () => {
    const result = centered([
      "1234567890123456789012345678901234567890",
      "1234567890123456789012345678901234567891.5",
      "1234567890123456789012345678901234567889.25",
    ]);
    // Doubles cannot tell these apart; the exact differences from the offset can.
    const values = Array.from(result.values).map((v) => v - result.values[0]);
    assert.deepEqual(values, [0, 1.5, -0.75]);
    assert.equal(Number(result.offsetText), result.offset);
  });

  it("converts a difference beyond 2^53 with BigInt and rounds it once", () => {
    const result = centered(["0.1", "12345678901234567890.1"]);
    // Offset: midpoint rounded to 1e19 -> 1e19 ("10000000000000000000").
    assert.equal(result.offsetText, "10000000000000000000");
    assert.equal(result.values[0], Number("-9999999999999999999.9"));
    assert.equal(result.values[1], Number("2345678901234567890.1"));
  });

  it("uses the value itself as offset when all values are equal, giving exact zeros", () => {
    const result = centered(["3.14159", "3.141590", "+3.14159"]);
    assert.equal(result.offsetText, "3.14159");
    assert.deepEqual(Array.from(result.values), [0, 0, 0]);
    assert.ok(!Object.is(result.values[0], -0));
  });

  it("returns offset 0 for no values", () => {
    const result = centered([]);
    assert.equal(result.offsetText, "0");
    assert.equal(result.values.length, 0);
  });

  it("reports the index and reason of an invalid or unrepresentable text", () => {
    assert.deepEqual(centerDecimals(["1", "2", "abc"]), { ok: false, index: 2, reason: "a number needs at least one digit" });
    const huge = centerDecimals(["1", "1e400"]);
    assert.ok(!huge.ok && huge.index === 1 && /larger in magnitude than the largest finite double/.test(huge.reason));
    const tiny = centerDecimals(["1e-400"]);
    assert.ok(!tiny.ok && tiny.index === 0 && /smallest positive double/.test(tiny.reason));
  });
});

describe("parseDecimal", () => {
  it("accepts the decimal forms a user types and keeps them exactly", () => {
    assert.deepEqual(parseDecimal("-0.50"), { ok: true, decimal: { negative: true, digits: "5", exponent: -1, value: -0.5 } });
    assert.deepEqual(parseDecimal("1.2e-3"), { ok: true, decimal: { negative: false, digits: "12", exponent: -4, value: 0.0012 } });
    assert.deepEqual(parseDecimal("+7"), { ok: true, decimal: { negative: false, digits: "7", exponent: 0, value: 7 } });
    assert.deepEqual(parseDecimal("7."), { ok: true, decimal: { negative: false, digits: "7", exponent: 0, value: 7 } });
    assert.deepEqual(parseDecimal(".5"), { ok: true, decimal: { negative: false, digits: "5", exponent: -1, value: 0.5 } });
    const negativeZero = parseDecimal("-0");
    assert.ok(negativeZero.ok && negativeZero.decimal.digits === "" && negativeZero.decimal.negative);
  });

  it("rejects text that is not a decimal number, without throwing", () => {
    for (const text of ["", ".", "-", "+", "1e", "1e+", "abc", "0x10", " 1", "1 ", "1.2.3", "1,5", "Infinity", "NaN", "1_000", "--1"]) {
      const result = parseDecimal(text);
      assert.ok(!result.ok && result.problem === "not-a-number", `${JSON.stringify(text)} should be rejected`);
    }
  });

  it("reports values outside the double range as out-of-range", () => {
    const result = parseDecimal("1e400");
    assert.ok(!result.ok && result.problem === "out-of-range");
    assert.ok(parseDecimal("1.7976931348623157e308").ok);
    assert.ok(parseDecimal("0e999999999999").ok);
  });
});
