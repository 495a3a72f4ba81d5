import type { TopLevelSpec } from "vega-lite";
import type { Design } from "../analysis/design.js";
import type { ResponseAnalysis } from "../analysis/results.js";
import { halfNormalPoints, normalProbabilityPoints, type Observation, observationsOf, twoLevelEffects } from "./plot-data.js";
import { ACCENT, OBSERVATION, PANEL, SERIES_SHAPES, VEGA_LITE_CONFIG } from "./plot-theme.js";

/**
 * Vega-Lite specifications of the report's plots, as plain data. User strings (factor, level, run and
 * response names) only ever appear as data values and titles, never as field names or expressions: the
 * fields are fixed names chosen here, so no name a user writes can be read as a path or an expression.
 */

/** A plot to draw, or a note saying why it is not drawn for this response. */
export type PlotPlan =
  | { readonly id: PlotId; readonly title: string; readonly caption: string; readonly spec: TopLevelSpec }
  | { readonly id: PlotId; readonly title: string; readonly note: string };

/** The plots of a response, in the order the report shows them. */
export type PlotId = "main-effects" | "interaction" | "points" | "residuals-fitted" | "residuals-order" | "normal-probability" | "half-normal";

/** At most this many panels per plot (factors or interactions), so a large model keeps a readable report. */
const MAX_PANELS = 6;

/** Plans every plot of one response. Pure; never throws for a result of `analyzeDocument`. */
export function planPlots(design: Design, response: ResponseAnalysis): PlotPlan[] {
  const observations = observationsOf(design, response);
  const unit = design.responses.find((r) => r.name === response.name)?.unit;
  const yTitle = unit ? `${response.name} (${unit})` : response.name;
  if (observations.length === 0) {
    const note = "No fitted observations yet, so there is nothing to plot.";
    return [{ id: "main-effects", title: "Plots", note }];
  }
  return [
    mainEffects(design, response, yTitle),
    interaction(design, observations, yTitle),
    pointsWithMeans(design, response, observations, yTitle),
    residualsVsFitted(observations, unit),
    residualsVsOrder(observations, unit),
    normalProbability(observations, unit),
    halfNormal(design, response, observations, unit),
  ];
}

/** Fixed and block factors that are main effects of the model, in declaration order. */
function mainEffectFactors(design: Design): number[] {
  return design.terms.flatMap((t) => (t.variables.length === 1 && t.variables[0]!.kind === "factor" && ["fixed", "block"].includes(design.factors[t.variables[0]!.index]!.role) ? [t.variables[0]!.index] : []));
}

function levelNames(design: Design, factor: number): string[] {
  return design.factors[factor]!.levels.map((l) => l.name);
}

function factorTitle(design: Design, factor: number): string {
  const f = design.factors[factor]!;
  return f.unit ? `${f.name} (${f.unit})` : f.name;
}

function top(spec: Record<string, unknown>): TopLevelSpec {
  return { $schema: "https://vega.github.io/schema/vega-lite/v6.json", config: VEGA_LITE_CONFIG, ...spec } as unknown as TopLevelSpec;
}

function mainEffects(design: Design, response: ResponseAnalysis, yTitle: string): PlotPlan {
  const title = "Main effects";
  const factors = mainEffectFactors(design).slice(0, MAX_PANELS);
  const panels = factors.flatMap((f) => {
    const name = design.factors[f]!.name;
    const values = response.means.filter((m) => m.term === name && Number.isFinite(m.mean)).map((m) => ({ level: m.level, mean: m.mean }));
    if (values.length < 2) return [];
    return [
      {
        width: PANEL.width,
        height: PANEL.height,
        data: { values },
        encoding: {
          x: { field: "level", type: "ordinal", sort: levelNames(design, f), title: factorTitle(design, f), axis: { labelAngle: 0 } },
          y: { field: "mean", type: "quantitative", scale: { zero: false }, title: `mean ${yTitle}` },
        },
        layer: [{ mark: { type: "line", color: ACCENT, strokeWidth: 2 } }, { mark: { type: "point", filled: true, color: ACCENT, size: 60 } }],
      },
    ];
  });
  if (panels.length === 0) return { id: "main-effects", title, note: "The model has no factor main effect with two or more measured levels." };
  return { id: "main-effects", title, caption: `Mean ${yTitle} at each level of each factor; a steep line is a large effect. Panels share the vertical scale.`, spec: top({ hconcat: panels, resolve: { scale: { y: "shared" } } }) };
}

function interaction(design: Design, observations: readonly Observation[], yTitle: string): PlotPlan {
  const title = "Interaction";
  const pairs = design.terms.filter((t) => t.variables.length === 2 && t.variables.every((v) => v.kind === "factor")).slice(0, MAX_PANELS);
  if (pairs.length === 0) return { id: "interaction", title, note: "The model has no two-factor interaction term." };
  const panels = pairs.map((term) => {
    const [a, b] = term.variables.map((v) => v.index) as [number, number];
    const cells = new Map<string, { x: string; series: string; sum: number; n: number }>();
    for (const o of observations) {
      const la = o.levels[a]!;
      const lb = o.levels[b]!;
      if (la < 0 || lb < 0) continue;
      const key = `${la},${lb}`;
      const cell = cells.get(key) ?? { x: design.factors[a]!.levels[la]!.name, series: design.factors[b]!.levels[lb]!.name, sum: 0, n: 0 };
      cell.sum += o.y;
      cell.n += 1;
      cells.set(key, cell);
    }
    const values = [...cells.entries()].map(([key, c]) => ({ x: c.x, series: c.series, mean: c.sum / c.n, xIndex: Number(key.split(",")[0]) }));
    // Each line is labelled at its right end, so a series can be told by its name as well as by colour
    // and marker shape (Vega-Lite does not merge a line's colour legend with a point's shape legend).
    const ends = new Map<string, (typeof values)[number]>();
    for (const v of values) if ((ends.get(v.series)?.xIndex ?? -1) < v.xIndex) ends.set(v.series, v);
    const seriesLevels = levelNames(design, b);
    return {
      width: PANEL.width,
      height: PANEL.height,
      encoding: {
        x: { field: "x", type: "ordinal", sort: levelNames(design, a), title: factorTitle(design, a), axis: { labelAngle: 0 } },
        y: { field: "mean", type: "quantitative", scale: { zero: false }, title: `mean ${yTitle}` },
        color: { field: "series", type: "nominal", sort: seriesLevels, title: factorTitle(design, b) },
      },
      layer: [
        { data: { values }, mark: { type: "line", strokeWidth: 2 } },
        { data: { values }, mark: { type: "point", filled: true, size: 60, opacity: 1 }, encoding: { shape: { field: "series", type: "nominal", sort: seriesLevels, legend: null, scale: { range: [...SERIES_SHAPES] } } } },
        { data: { values: [...ends.values()] }, mark: { type: "text", align: "left", dx: 8, fontSize: 11, fontWeight: 600 }, encoding: { text: { field: "series", type: "nominal" } } },
      ],
    };
  });
  return {
    id: "interaction",
    title,
    caption: "Cell means of the observations: one line per level of the second factor. Parallel lines mean no interaction; crossing or diverging lines mean the effect of one factor depends on the other.",
    spec: top({ hconcat: panels, resolve: { scale: { color: "independent", shape: "independent" }, legend: { color: "independent" } } }),
  };
}

function pointsWithMeans(design: Design, response: ResponseAnalysis, observations: readonly Observation[], yTitle: string): PlotPlan {
  const title = "Observations by level";
  const factors = mainEffectFactors(design).slice(0, MAX_PANELS);
  if (factors.length === 0) return { id: "points", title, note: "The model has no factor main effect." };
  const level = Math.round(response.confidence * 100);
  const panels = factors.map((f) => {
    const name = design.factors[f]!.name;
    const points = observations.filter((o) => o.levels[f]! >= 0).map((o) => ({ level: design.factors[f]!.levels[o.levels[f]!]!.name, y: o.y }));
    const means = response.means.filter((m) => m.term === name).map((m) => ({ level: m.level, mean: m.mean, lower: m.lower, upper: m.upper }));
    const intervals = means.filter((m) => m.lower !== null && m.upper !== null && Number.isFinite(m.lower) && Number.isFinite(m.upper));
    const x = { field: "level", type: "ordinal", sort: levelNames(design, f), title: factorTitle(design, f), axis: { labelAngle: 0 } };
    return {
      width: PANEL.width,
      height: PANEL.height,
      layer: [
        { data: { values: points }, mark: { type: "point", color: OBSERVATION, opacity: 0.55, size: 30 }, encoding: { x, y: { field: "y", type: "quantitative", scale: { zero: false }, title: yTitle } } },
        { data: { values: intervals }, mark: { type: "rule", color: ACCENT, strokeWidth: 2 }, encoding: { x, y: { field: "lower", type: "quantitative" }, y2: { field: "upper" } } },
        { data: { values: means }, mark: { type: "tick", color: ACCENT, thickness: 3, size: 18 }, encoding: { x, y: { field: "mean", type: "quantitative" } } },
      ],
    };
  });
  return {
    id: "points",
    title,
    caption: `Every measured run (grey), the level mean (bar) and its ${level}% confidence interval from the pooled residual variance (vertical line).`,
    spec: top({ hconcat: panels, resolve: { scale: { y: "shared" } } }),
  };
}

function residualTitle(unit: string | undefined): string {
  return unit ? `residual (${unit})` : "residual";
}

function zeroRule(): Record<string, unknown> {
  return { data: { values: [{ zero: 0 }] }, mark: { type: "rule", color: ACCENT, strokeDash: [4, 3] }, encoding: { y: { field: "zero", type: "quantitative" } } };
}

function residualsVsFitted(observations: readonly Observation[], unit: string | undefined): PlotPlan {
  const values = observations.map((o) => ({ fitted: o.fitted, residual: o.residual }));
  return {
    id: "residuals-fitted",
    title: "Residuals vs fitted",
    caption: "A funnel shape suggests the spread grows with the level of the response; a curve suggests a missing term.",
    spec: top({
      width: PANEL.width * 1.4,
      height: PANEL.height,
      layer: [
        zeroRule(),
        { data: { values }, mark: { type: "point", color: OBSERVATION, opacity: 0.7, filled: true }, encoding: { x: { field: "fitted", type: "quantitative", scale: { zero: false }, title: unit ? `fitted (${unit})` : "fitted" }, y: { field: "residual", type: "quantitative", title: residualTitle(unit) } } },
      ],
    }),
  };
}

function residualsVsOrder(observations: readonly Observation[], unit: string | undefined): PlotPlan {
  const values = observations.map((o) => ({ order: o.order, residual: o.residual }));
  const x = { field: "order", type: "quantitative", scale: { zero: false }, title: "run order (row of the runs table)", axis: { tickMinStep: 1 } };
  return {
    id: "residuals-order",
    title: "Residuals vs run order",
    caption: "A trend or runs of same-signed residuals suggest drift during the experiment (tool wear, warm-up, a change of batch).",
    spec: top({
      width: PANEL.width * 1.4,
      height: PANEL.height,
      layer: [
        zeroRule(),
        { data: { values }, mark: { type: "line", color: OBSERVATION, opacity: 0.35 }, encoding: { x, y: { field: "residual", type: "quantitative", title: residualTitle(unit) } } },
        { data: { values }, mark: { type: "point", color: OBSERVATION, opacity: 0.8, filled: true }, encoding: { x, y: { field: "residual", type: "quantitative" } } },
      ],
    }),
  };
}

function normalProbability(observations: readonly Observation[], unit: string | undefined): PlotPlan {
  const title = "Normal probability plot of residuals";
  if (observations.length < 3) return { id: "normal-probability", title, note: "Fewer than three residuals: not enough for a probability plot." };
  const points = normalProbabilityPoints(observations.map((o) => ({ value: o.residual, label: o.run })));
  // Reference line through the quartiles of the residuals and of the normal distribution (Chambers,
  // Cleveland, Kleiner and Tukey 1983, §6.3): robust to the outliers the plot is meant to reveal.
  const sorted = points.map((p) => p.value);
  const q1 = quantileOf(sorted, 0.25);
  const q3 = quantileOf(sorted, 0.75);
  const z = 0.6744897501960817; // Φ⁻¹(0.75)
  const slope = (q3 - q1) / (2 * z);
  const intercept = q1 + slope * z;
  const lo = points[0]!.quantile;
  const hi = points[points.length - 1]!.quantile;
  const line = [{ quantile: lo, value: intercept + slope * lo }, { quantile: hi, value: intercept + slope * hi }];
  const x = { field: "quantile", type: "quantitative", title: "normal quantile (Blom positions)" };
  return {
    id: "normal-probability",
    title,
    caption: "Points near the line mean roughly normal residuals; an S shape means heavy or light tails, single points far off the line are outliers.",
    spec: top({
      width: PANEL.width * 1.4,
      height: PANEL.height,
      layer: [
        { data: { values: line }, mark: { type: "line", color: ACCENT, strokeDash: [4, 3] }, encoding: { x, y: { field: "value", type: "quantitative" } } },
        { data: { values: points.map((p) => ({ quantile: p.quantile, value: p.value })) }, mark: { type: "point", color: OBSERVATION, opacity: 0.8, filled: true }, encoding: { x, y: { field: "value", type: "quantitative", title: residualTitle(unit) } } },
      ],
    }),
  };
}

/** Linear interpolation between order statistics (type 7 of Hyndman and Fan 1996) of sorted values. */
function quantileOf(sorted: readonly number[], p: number): number {
  const h = (sorted.length - 1) * p;
  const k = Math.floor(h);
  const next = sorted[Math.min(k + 1, sorted.length - 1)]!;
  return sorted[k]! + (h - k) * (next - sorted[k]!);
}

function halfNormal(design: Design, response: ResponseAnalysis, observations: readonly Observation[], unit: string | undefined): PlotPlan {
  const title = "Half-normal plot of effects";
  let points: { quantile: number; value: number; label: string }[];
  if (response.effects && response.effects.length >= 2) {
    // The two-level analysis (analysis/extensions) has estimated the effects and their half-normal scores.
    points = response.effects.filter((e) => Number.isFinite(e.effect) && Number.isFinite(e.halfNormalScore)).map((e) => ({ quantile: e.halfNormalScore, value: Math.abs(e.effect), label: e.term }));
  } else {
    const effects = twoLevelEffects(design, response, observations);
    if (!effects.ok) return { id: "half-normal", title, note: effects.reason };
    points = halfNormalPoints(effects.effects.map((e) => ({ value: e.effect, label: e.term })));
  }
  const x = { field: "quantile", type: "quantitative", title: "half-normal quantile" };
  const y = { field: "effect", type: "quantitative", title: unit ? `|effect| (${unit})` : "|effect|" };
  const values = points.map((p) => ({ quantile: p.quantile, effect: p.value, term: p.label }));
  return {
    id: "half-normal",
    title,
    caption: "Absolute effects against half-normal quantiles (Daniel 1959): inactive effects fall on a line through the origin, active ones stand out above it.",
    spec: top({
      width: PANEL.width * 1.4,
      height: PANEL.height,
      data: { values },
      layer: [
        { mark: { type: "point", color: ACCENT, filled: true, size: 50 }, encoding: { x, y } },
        { mark: { type: "text", align: "left", dx: 6, color: OBSERVATION, fontSize: 10 }, encoding: { x, y, text: { field: "term", type: "nominal" } } },
      ],
    }),
  };
}
