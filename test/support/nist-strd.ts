/**
 * Reader for the NIST StRD ANOVA datasets (test/stats/fixtures/nist-strd-anova/, NIST/ITL Statistical
 * Reference Datasets, public domain) and the log relative error used to score results against them.
 */

import fs from "node:fs";
import path from "node:path";

export const NIST_DIR = path.resolve("test/stats/fixtures/nist-strd-anova");
export const NIST_DATASETS = ["SiRstv", "SmLs01", "SmLs02", "SmLs03", "AtmWtAg", "SmLs04", "SmLs05", "SmLs06", "SmLs07", "SmLs08", "SmLs09"];

export interface Certified {
  betweenDf: number;
  betweenSs: number;
  betweenMs: number;
  f: number;
  withinDf: number;
  withinSs: number;
  withinMs: number;
  rSquared: number;
  residualSd: number;
}

/** Reads the certified block (the "Between"/"Within" lines and the two labelled values) and the data lines. */
export function readDataset(name: string): { certified: Certified; groups: number[]; responses: string[] } {
  const lines = fs.readFileSync(path.join(NIST_DIR, `${name}.dat`), "utf8").split(/\r?\n/);
  const numbers = (line: string) => line.trim().split(/\s+/).slice(2).map(Number);
  const between = numbers(lines.find((l) => /^\s*Between /.test(l))!);
  const within = numbers(lines.find((l) => /^\s*Within /.test(l))!);
  const r2 = Number(lines.find((l) => /Certified R-Squared/.test(l))!.trim().split(/\s+/).pop());
  const sd = Number(lines.find((l) => /Standard Deviation/.test(l))!.trim().split(/\s+/).pop());
  // The data header is the last line starting "Data:" (an earlier one describes the design).
  let start = 0;
  lines.forEach((l, i) => {
    if (/^Data:/.test(l)) start = i + 1;
  });
  const groups: number[] = [];
  const responses: string[] = [];
  for (const line of lines.slice(start)) {
    const cells = line.trim().split(/\s+/);
    if (cells.length !== 2) continue;
    groups.push(Number(cells[0]));
    responses.push(cells[1]!);
  }
  return {
    certified: {
      betweenDf: between[0]!, betweenSs: between[1]!, betweenMs: between[2]!, f: between[3]!,
      withinDf: within[0]!, withinSs: within[1]!, withinMs: within[2]!, rSquared: r2, residualSd: sd,
    },
    groups,
    responses,
  };
}

/** Log relative error capped at 15; the absolute error is used when the certified value is 0. */
export function lre(computed: number | null, certified: number): number {
  if (computed === null) return 0;
  const err = certified === 0 ? Math.abs(computed) : Math.abs(computed - certified) / Math.abs(certified);
  return err === 0 ? 15 : Math.min(15, -Math.log10(err));
}

