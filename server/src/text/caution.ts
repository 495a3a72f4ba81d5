/**
 * The caution every report and the README carry (design brief §7), in one place so that the CLI text
 * output, the HTML and Markdown reports and the editor's report panel say exactly the same thing.
 */
export const CAUTION =
  "Statistical significance is not engineering acceptance. Where a change affects safety, health or structural integrity, apply the relevant standards and have qualified, licensed people review it.";
