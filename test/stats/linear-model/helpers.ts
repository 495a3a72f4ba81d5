/**
 * Shared helpers of the linear-model tests: tolerance comparison and a deep scan proving a result
 * holds no NaN or Infinity (JSON.stringify would silently turn them into null, so the scan walks the
 * values themselves, typed arrays included).
 */

import assert from "node:assert/strict";

/** Asserts |actual - expected| <= max(rel * |expected|, abs), with a message naming `what`. */
export function assertClose(actual: number | null | undefined, expected: number, what: string, rel = 1e-9, abs = 1e-12): void {
  assert.ok(typeof actual === "number", `${what}: expected ${expected}, got ${String(actual)}`);
  const tol = Math.max(rel * Math.abs(expected), abs);
  assert.ok(Math.abs(actual - expected) <= tol, `${what}: expected ${expected}, got ${actual} (diff ${actual - expected}, tol ${tol})`);
}

/** Returns the paths of every non-finite number inside `value`. */
export function nonFiniteNumbers(value: unknown, path = "$"): string[] {
  if (typeof value === "number") return Number.isFinite(value) ? [] : [path];
  if (value === null || typeof value !== "object") return [];
  if (ArrayBuffer.isView(value)) {
    const out: string[] = [];
    const arr = value as unknown as ArrayLike<number>;
    for (let i = 0; i < arr.length; i++) if (!Number.isFinite(arr[i]!)) out.push(`${path}[${i}]`);
    return out;
  }
  return Object.entries(value as Record<string, unknown>).flatMap(([k, v]) => nonFiniteNumbers(v, `${path}.${k}`));
}
