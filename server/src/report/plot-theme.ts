/**
 * The visual style of Trialbook's plots. Colours come from the palette of Okabe and Ito (2008, "Color
 * Universal Design"), which stays distinguishable for the common forms of colour-vision deficiency; series
 * are told apart by marker shape as well, so a plot also reads in greyscale. Text, axes and grid lines are
 * drawn in `currentColor`, so an inline SVG takes the foreground colour of the page around it and stays
 * legible on light and dark backgrounds alike; the background is transparent for the same reason.
 */

/** Series colours in the order they are used; yellow (#F0E442) is left out: it vanishes on white. */
export const SERIES_COLOURS: readonly string[] = ["#E69F00", "#56B4E9", "#009E73", "#D55E00", "#CC79A7", "#0072B2"];

/** Marker shapes paired with the series colours, so that no information rests on colour alone. */
export const SERIES_SHAPES: readonly string[] = ["circle", "square", "triangle-up", "diamond", "cross", "triangle-down"];

/** The colour of means, intervals and reference lines: vermillion reads on both light and dark grounds. */
export const ACCENT = "#D55E00";

/** The colour of individual observations: the page's text colour, made lighter by opacity. */
export const OBSERVATION = "currentColor";

/** Width and height in pixels of one plot panel. */
export const PANEL = { width: 220, height: 170 } as const;

/** Vega-Lite `config` shared by every plot. */
export const VEGA_LITE_CONFIG = {
  background: "transparent",
  padding: 8,
  font: "system-ui, -apple-system, 'Segoe UI', sans-serif",
  view: { stroke: "currentColor", strokeOpacity: 0.25 },
  title: { color: "currentColor", fontSize: 13, fontWeight: 600, anchor: "start", subtitleColor: "currentColor" },
  axis: {
    labelColor: "currentColor",
    titleColor: "currentColor",
    domainColor: "currentColor",
    domainOpacity: 0.6,
    tickColor: "currentColor",
    tickOpacity: 0.6,
    gridColor: "currentColor",
    gridOpacity: 0.12,
    labelFontSize: 11,
    titleFontSize: 11,
    titleFontWeight: 600,
    labelLimit: 120,
  },
  legend: { labelColor: "currentColor", titleColor: "currentColor", labelFontSize: 11, titleFontSize: 11, labelLimit: 140 },
  header: { labelColor: "currentColor", titleColor: "currentColor" },
  range: { category: [...SERIES_COLOURS] },
  point: { size: 42 },
} as const;
