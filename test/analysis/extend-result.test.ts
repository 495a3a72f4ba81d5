import { strict as assert } from "node:assert";
import { extendResult } from "../../server/src/analysis/analyze-response.js";
import type { ResponseAnalysis } from "../../server/src/analysis/results.js";

describe("extendResult", () => {
  it("keeps accessors lazy, keys in order, and lets later keys replace earlier ones in place", () => {
    let reads = 0;
    const base = { name: "y", n: 3, get residuals() {
      reads++;
      return [];
    }, alpha: 0.05 } as unknown as ResponseAnalysis;
    const add: Record<string, unknown> = { n: 4, power: [] };
    let tables = 0;
    Object.defineProperty(add, "comparisons", { enumerable: true, configurable: true, get: () => ++tables });
    const out = extendResult(base, add as Partial<ResponseAnalysis>) as unknown as Record<string, unknown>;
    assert.equal(reads, 0, "merging must not build the residual rows");
    assert.equal(tables, 0, "merging must not compute the comparison tables");
    assert.deepEqual(Object.keys(out), ["name", "n", "residuals", "alpha", "power", "comparisons"]);
    assert.equal(out.n, 4);
    assert.deepEqual(JSON.parse(JSON.stringify(out)), { name: "y", n: 4, residuals: [], alpha: 0.05, power: [], comparisons: 1 });
    assert.equal(reads, 1);
    // A second merge keeps the accessor an accessor.
    const again = extendResult(out as unknown as ResponseAnalysis, {}) as unknown as Record<string, unknown>;
    assert.equal(typeof Object.getOwnPropertyDescriptor(again, "residuals")!.get, "function");
  });
});

describe("withResult", () => {
  it("replaces the result without reading the context's accessors", async () => {
    const { withResult } = await import("../../server/src/analysis/analyze-response.js");
    let built = 0;
    const context = { responseIndex: 1, get runs() {
      built++;
      return [0, 1];
    }, result: { name: "old" } } as unknown as Parameters<typeof withResult>[0];
    const next = withResult(context, { name: "new" } as unknown as ResponseAnalysis);
    assert.equal(built, 0, "the run array must not be built by the copy");
    assert.equal((next.result as { name: string }).name, "new");
    assert.equal(next.responseIndex, 1);
    assert.deepEqual(next.runs, [0, 1]);
    assert.equal(built, 1);
  });
});
