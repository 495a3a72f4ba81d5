import { parse, View } from "vega";
import { expressionInterpreter } from "vega-interpreter";
import { compile, type TopLevelSpec } from "vega-lite";

/** An SVG document as a string, or the reason it could not be drawn. */
export type SvgResult = { readonly ok: true; readonly svg: string } | { readonly ok: false; readonly reason: string };

/** Least-recently-used cache of drawn plots, keyed by their specification. */
const CACHE = new Map<string, string>();
const CACHE_SIZE = 96;

/**
 * Renders a Vega-Lite specification to an SVG string, headless. The specification is compiled to Vega and
 * parsed with `ast: true`, and the view evaluates expressions with Vega's interpreter instead of generating
 * functions at run time, so nothing needs `eval` or `new Function` (the webview's Content-Security-Policy
 * forbids both). The renderer is "none": no canvas and no DOM, only the scenegraph serialised to SVG.
 * Specifications carry their data inline, so nothing is ever loaded from a file or the network.
 * Never throws: a failure comes back as `{ ok: false, reason }`.
 */
export async function renderSvg(spec: TopLevelSpec): Promise<SvgResult> {
  // Drawing takes tens to hundreds of milliseconds per plot; while the user types in a text block or a
  // comment the data do not change, so the same specification is answered from a small cache.
  const key = JSON.stringify(spec);
  const cached = CACHE.get(key);
  if (cached !== undefined) {
    CACHE.delete(key);
    CACHE.set(key, cached);
    return { ok: true, svg: cached };
  }
  try {
    const vega = compile(spec).spec;
    const view = new View(parse(vega, undefined, { ast: true }), { renderer: "none", expr: expressionInterpreter, logLevel: 0 } as ConstructorParameters<typeof View>[1]);
    try {
      const svg = await view.toSVG();
      CACHE.set(key, svg);
      if (CACHE.size > CACHE_SIZE) CACHE.delete(CACHE.keys().next().value!);
      return { ok: true, svg };
    } finally {
      view.finalize();
    }
  } catch (error) {
    return { ok: false, reason: error instanceof Error ? error.message : String(error) };
  }
}
