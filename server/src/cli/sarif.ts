/**
 * SARIF 2.1.0 (OASIS Static Analysis Results Interchange Format, Version 2.1.0, 2020) output of
 * `trialbook check --format sarif`, as code-scanning services read it: one run, one `reportingDescriptor`
 * per diagnostic code of `DIAGNOSTIC_RULES` (whether or not it occurs), one result per diagnostic with a
 * physical location (file URI relative to the repository root, 1-based region in UTF-16 code units).
 */
import { DIAGNOSTIC_RULES, type DiagnosticRule, type Severity } from "../analysis/diagnostics.js";
import { VERSION } from "../version.js";
import { diagnosticHelp } from "./diagnostic-help.js";

/** A region in 1-based lines and UTF-16 columns; the end column is exclusive, as SARIF §3.30 defines it. */
export interface SarifRegion {
  readonly startLine: number;
  readonly startColumn: number;
  readonly endLine: number;
  readonly endColumn: number;
}

/** One diagnostic ready for SARIF: its file (as shown to the user), code, severity, message and regions. */
export interface SarifDiagnostic {
  readonly file: string;
  readonly code: string;
  readonly severity: Severity;
  readonly message: string;
  readonly region: SarifRegion;
  readonly related?: readonly { readonly message: string; readonly region: SarifRegion }[];
}

/** The `$schema` URI written into the log (the OASIS-published schema of the 2.1.0 standard). */
export const SARIF_SCHEMA_URI = "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json";

/** SARIF `level` for a Trialbook severity: information and hint become `note`, SARIF's lowest reported level. */
export function sarifLevel(severity: Severity): "error" | "warning" | "note" {
  return severity === "error" ? "error" : severity === "warning" ? "warning" : "note";
}

/** `unknown-level` → `UnknownLevel`: the rule's `name`, an identifier-like form of its id (SARIF §3.49.7). */
export function ruleName(code: string): string {
  return code
    .split(/[^A-Za-z0-9]+/)
    .filter((p) => p.length > 0)
    .map((p) => p[0]!.toUpperCase() + p.slice(1))
    .join("");
}

/** The reporting descriptors: one per code of `DIAGNOSTIC_RULES`, in its order. */
export function sarifRules(): object[] {
  return Object.entries(DIAGNOSTIC_RULES as Readonly<Record<string, DiagnosticRule>>).map(([code, rule]) => {
    const help = diagnosticHelp(code);
    return {
      id: code,
      name: ruleName(code),
      shortDescription: { text: rule.summary },
      fullDescription: { text: help.fullDescription },
      help: { text: help.help, markdown: `${help.help}\n\nCode \`${code}\`, default severity ${rule.severity}.` },
      defaultConfiguration: { level: sarifLevel(rule.severity) },
      properties: { tags: ["trialbook", "designed-experiments"], "trialbook/severity": rule.severity },
    };
  });
}

/** A path as shown to the user → a relative URI reference with `/` separators and percent-encoded characters. */
export function fileUri(path: string): string {
  const parts = path.split(/[\\/]+/).filter((p) => p !== "" && p !== ".");
  return parts.map((p) => encodeURIComponent(p)).join("/");
}

/**
 * The SARIF log for a set of diagnostics. `files` lists every file checked (also those without results), so
 * the log records what was analysed in `artifacts`.
 */
export function sarifLog(files: readonly string[], diagnostics: readonly SarifDiagnostic[]): object {
  const rules = sarifRules() as { id: string }[];
  const ruleIndex = new Map(rules.map((r, k) => [r.id, k] as const));
  const artifactIndex = new Map<string, number>();
  const artifacts: object[] = [];
  for (const file of files) {
    const uri = fileUri(file);
    if (artifactIndex.has(uri)) continue;
    artifactIndex.set(uri, artifacts.length);
    artifacts.push({ location: { uri, uriBaseId: "%SRCROOT%" }, roles: ["analysisTarget"] });
  }
  const location = (file: string, region: SarifRegion) => {
    const uri = fileUri(file);
    const index = artifactIndex.get(uri);
    return { physicalLocation: { artifactLocation: { uri, uriBaseId: "%SRCROOT%", ...(index !== undefined ? { index } : {}) }, region: { ...region } } };
  };
  const results = diagnostics.map((d) => {
    const index = ruleIndex.get(d.code);
    return {
      ruleId: d.code,
      ...(index !== undefined ? { ruleIndex: index } : {}),
      level: sarifLevel(d.severity),
      message: { text: d.message },
      locations: [location(d.file, d.region)],
      ...(d.related && d.related.length > 0
        ? { relatedLocations: d.related.map((r, k) => ({ id: k + 1, ...location(d.file, r.region), message: { text: r.message } })) }
        : {}),
    };
  });
  return {
    $schema: SARIF_SCHEMA_URI,
    version: "2.1.0",
    runs: [
      {
        tool: { driver: { name: "Trialbook", version: VERSION, semanticVersion: VERSION, rules } },
        artifacts,
        results,
        columnKind: "utf16CodeUnits",
      },
    ],
  };
}
