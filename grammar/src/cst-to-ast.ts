/**
 * Builds the typed AST (`ast.ts`) from the parser's concrete syntax tree. This is the only module that
 * knows token and CST names; everything after it speaks the AST.
 *
 * Error recovery can leave nodes half-built (a token inserted by the parser has no text and a NaN
 * offset). Such tokens are ignored here, so a half-typed `factor temp levels` still gives a factor
 * `temp` with zero levels, next to the parser's problem.
 */
import { EOF, type CstNode, type ILexingResult, type IRecognitionException, type IToken } from "chevrotain";
import type {
  CovariateDecl,
  DecimalNumber,
  Declaration,
  FactorDecl,
  FactorRole,
  Goal,
  LevelDecl,
  ModelTerm,
  Name,
  NumericPlanKey,
  PlanBlock,
  PlanSetting,
  ResponseDecl,
  RunRows,
  RunsTable,
  Span,
  SpecLimits,
  SyntaxProblem,
  TextBlockDecl,
  TextValue,
  TrialFile,
  TrialHeader,
} from "./ast.js";
import type {
  ControlClauseCstNode,
  CovariateDeclCstNode,
  DateLineCstNode,
  FactorDeclCstNode,
  LevelCstNode,
  NameCstNode,
  NumericSettingCstNode,
  PlanBlockCstNode,
  ResponseDeclCstNode,
  RunsTableCstNode,
  SpecClauseCstNode,
  TermCstNode,
  TextBlockDeclCstNode,
  TextValueCstNode,
  TrialFileCstNode,
} from "./cst.generated.js";
import type { PlainRunsBody } from "./plain-runs-body.js";
import { runsBodyProblems, scanRunsTable, unquote, type RunsBodyScan } from "./runs-scanner.js";
import { isTopLevelKeyword } from "./tokens.js";

const IDENTIFIER = /^[A-Za-z_][A-Za-z0-9_-]*$/;

function problem(message: string, span: Span): SyntaxProblem {
  return { code: "syntax", message, span };
}

/** A token the user wrote (not one the parser inserted while recovering). */
function real(token: IToken | undefined): IToken | undefined {
  return token !== undefined && !token.isInsertedInRecovery && !Number.isNaN(token.startOffset) ? token : undefined;
}

function firstReal(tokens: IToken[] | undefined): IToken | undefined {
  if (tokens === undefined) return undefined;
  for (const t of tokens) if (real(t)) return t;
  return undefined;
}

function tokenEnd(token: IToken): number {
  return token.startOffset + token.image.length;
}

function tokenSpan(token: IToken): Span {
  return { start: token.startOffset, end: tokenEnd(token) };
}

/** The span from the first to the last real token of a CST node, or undefined when it has none. */
function nodeSpan(node: CstNode): Span | undefined {
  let start = Infinity;
  let end = -Infinity;
  const visit = (n: CstNode): void => {
    for (const key in n.children) {
      for (const child of n.children[key]!) {
        if ("children" in child) {
          visit(child);
        } else if (real(child)) {
          if (child.startOffset < start) start = child.startOffset;
          const e = tokenEnd(child);
          if (e > end) end = e;
        }
      }
    }
  };
  visit(node);
  return start === Infinity ? undefined : { start, end };
}

/** Collects the problems of one file while the AST is built. */
class Builder {
  readonly problems: SyntaxProblem[] = [];

  constructor(readonly source: string) {}

  report(message: string, span: Span): void {
    this.problems.push(problem(message, span));
  }

  number(token: IToken | undefined): DecimalNumber | undefined {
    const t = real(token);
    if (t === undefined) return undefined;
    const value = Number(t.image);
    if (!Number.isFinite(value)) {
      this.report(`the number ${t.image} is too large to represent: write a smaller magnitude`, tokenSpan(t));
      return undefined;
    }
    // `-0` is kept as written in `text`; the value is the plain zero so no negative zero leaks out.
    return { text: t.image, value: value === 0 ? 0 : value, span: tokenSpan(t) };
  }

  /** A name from an identifier-like token or a (possibly unterminated) string token. */
  nameFromToken(token: IToken | undefined): Name | undefined {
    const t = real(token);
    if (t === undefined) return undefined;
    if (t.tokenType.name === "StringLiteral") return { text: unquote(t.image, true), span: tokenSpan(t), quoted: true };
    if (t.tokenType.name === "UnterminatedString") {
      return { text: unquote(t.image, false), span: tokenSpan(t), quoted: true };
    }
    return { text: t.image, span: tokenSpan(t), quoted: false };
  }

  name(node: NameCstNode | undefined): Name | undefined {
    if (node === undefined) return undefined;
    const c = node.children;
    return this.nameFromToken(firstReal(c.NameToken) ?? firstReal(c.StringLiteral) ?? firstReal(c.UnterminatedString));
  }

  textFromName(node: NameCstNode | TextValueCstNode | undefined): TextValue | undefined {
    const n = this.name(node as NameCstNode | undefined);
    return n === undefined ? undefined : { text: n.text, span: n.span };
  }

  level(node: LevelCstNode | ControlClauseCstNode["children"]["level"][number] | undefined): LevelDecl | undefined {
    if (node === undefined) return undefined;
    const c = node.children;
    const numberToken = firstReal(c.NumberLiteral);
    if (numberToken !== undefined) {
      const name: Name = { text: numberToken.image, span: tokenSpan(numberToken), quoted: false };
      const number = this.number(numberToken);
      return number === undefined ? { name } : { name, number };
    }
    const name = this.nameFromToken(firstReal(c.NameToken) ?? firstReal(c.StringLiteral) ?? firstReal(c.UnterminatedString));
    return name === undefined ? undefined : { name };
  }

  term(node: TermCstNode | undefined): ModelTerm | undefined {
    if (node === undefined) return undefined;
    const names: Name[] = [];
    for (const n of node.children.name ?? []) {
      const name = this.name(n);
      if (name !== undefined) names.push(name);
    }
    const span = nodeSpan(node);
    return names.length === 0 || span === undefined ? undefined : { span, names };
  }

  /** Reports every clause after the first of a kind that may appear once. */
  once<T extends CstNode>(nodes: T[] | undefined, what: string, where: string): T | undefined {
    if (nodes === undefined || nodes.length === 0) return undefined;
    for (let i = 1; i < nodes.length; i++) {
      const span = nodeSpan(nodes[i]!);
      if (span !== undefined) this.report(`${what} is given twice in ${where}: keep one`, span);
    }
    return nodes[0];
  }
}

function whereOf(kind: string, name: Name | undefined): string {
  return name === undefined ? `this ${kind}` : `${kind} '${name.text}'`;
}

function responseDecl(b: Builder, node: ResponseDeclCstNode): ResponseDecl | undefined {
  const c = node.children;
  const keyword = firstReal(c.Response);
  const span = nodeSpan(node);
  if (keyword === undefined || span === undefined) return undefined;
  const name = b.name(c.name?.[0]);
  const where = whereOf("response", name);
  const unit = b.textFromName(b.once(c.unitClause, "the unit", where)?.children.name?.[0]);
  const goals: Goal[] = [];
  for (const t of c.Maximize ?? []) if (real(t)) goals.push({ kind: "maximize", span: tokenSpan(t) });
  for (const t of c.Minimize ?? []) if (real(t)) goals.push({ kind: "minimize", span: tokenSpan(t) });
  for (const clause of c.targetClause ?? []) {
    const clauseSpan = nodeSpan(clause);
    if (clauseSpan === undefined) continue;
    const target = b.number(clause.children.NumberLiteral?.[0]);
    goals.push(target === undefined ? { kind: "target", span: clauseSpan } : { kind: "target", span: clauseSpan, target });
  }
  goals.sort((x, y) => x.span.start - y.span.start);
  for (let i = 1; i < goals.length; i++) {
    b.report(`${where} has more than one goal (maximize, minimize, target): keep one`, goals[i]!.span);
  }
  const specNode = b.once(c.specClause, "spec", where);
  const spec = specNode === undefined ? undefined : specLimits(b, specNode);
  return {
    kind: "response",
    span,
    keywordSpan: tokenSpan(keyword),
    ...(name ? { name } : {}),
    ...(unit ? { unit } : {}),
    ...(goals[0] ? { goal: goals[0] } : {}),
    ...(spec ? { spec } : {}),
  };
}

function specLimits(b: Builder, node: SpecClauseCstNode): SpecLimits | undefined {
  const span = nodeSpan(node);
  if (span === undefined) return undefined;
  const c = node.children;
  const numbers = c.NumberLiteral ?? [];
  if (c.GreaterEqual !== undefined) {
    const lower = b.number(numbers[0]);
    return lower ? { span, lower } : { span };
  }
  if (c.LessEqual !== undefined) {
    const upper = b.number(numbers[0]);
    return upper ? { span, upper } : { span };
  }
  const lower = b.number(numbers[0]);
  const upper = b.number(numbers[1]);
  return { span, ...(lower ? { lower } : {}), ...(upper ? { upper } : {}) };
}

function factorDecl(b: Builder, node: FactorDeclCstNode): FactorDecl | undefined {
  const c = node.children;
  const keyword = firstReal(c.Factor);
  const span = nodeSpan(node);
  if (keyword === undefined || span === undefined) return undefined;
  const name = b.name(c.name?.[0]);
  const where = whereOf("factor", name);
  const levelsNode = b.once(c.levelsClause, "levels", where);
  const levels: LevelDecl[] = [];
  for (const l of levelsNode?.children.level ?? []) {
    const level = b.level(l);
    if (level !== undefined) levels.push(level);
  }
  if (levelsNode === undefined && name !== undefined) {
    b.report(`factor '${name.text}' has no levels: add them, e.g. 'levels low, high' or 'levels 150, 175'`, {
      start: keyword.startOffset,
      end: name.span.end,
    });
  }
  const unit = b.textFromName(b.once(c.unitClause, "the unit", where)?.children.name?.[0]);
  const roleNode = b.once(c.roleClause, "the role (as ...)", where);
  let role: FactorRole = "fixed";
  let roleSpan: Span | undefined;
  if (roleNode !== undefined) {
    const rc = roleNode.children;
    if (firstReal(rc.Block)) role = "block";
    else if (firstReal(rc.Random)) role = "random";
    else if (firstReal(rc.Subject)) role = "subject";
    roleSpan = nodeSpan(roleNode);
  }
  const control = b.level(b.once(c.controlClause, "control", where)?.children.level?.[0])?.name;
  const within = b.name(b.once(c.withinClause, "within", where)?.children.name?.[0]);
  return {
    kind: "factor",
    span,
    keywordSpan: tokenSpan(keyword),
    ...(name ? { name } : {}),
    levels,
    ...(unit ? { unit } : {}),
    role,
    ...(roleSpan ? { roleSpan } : {}),
    ...(control ? { control } : {}),
    ...(within ? { within } : {}),
  };
}

function covariateDecl(b: Builder, node: CovariateDeclCstNode): CovariateDecl | undefined {
  const c = node.children;
  const keyword = firstReal(c.Covariate);
  const span = nodeSpan(node);
  if (keyword === undefined || span === undefined) return undefined;
  const name = b.name(c.name?.[0]);
  const unit = b.textFromName(b.once(c.unitClause, "the unit", whereOf("covariate", name))?.children.name?.[0]);
  return { kind: "covariate", span, keywordSpan: tokenSpan(keyword), ...(name ? { name } : {}), ...(unit ? { unit } : {}) };
}

const NUMERIC_KEYS: readonly [keyof NumericSettingCstNode["children"], NumericPlanKey][] = [
  ["Replicates", "replicates"],
  ["Alpha", "alpha"],
  ["Confidence", "confidence"],
  ["Power", "power"],
  ["Seed", "seed"],
  ["CentrePoints", "centre-points"],
];

function planBlock(b: Builder, node: PlanBlockCstNode): PlanBlock | undefined {
  const c = node.children;
  const keyword = firstReal(c.Plan);
  const span = nodeSpan(node);
  if (keyword === undefined || span === undefined) return undefined;
  const settings: PlanSetting[] = [];
  for (const s of c.numericSetting ?? []) {
    const sSpan = nodeSpan(s);
    for (const [key, kind] of NUMERIC_KEYS) {
      const kw = firstReal(s.children[key] as IToken[] | undefined);
      if (kw === undefined || sSpan === undefined) continue;
      const value = b.number(s.children.NumberLiteral?.[0]);
      settings.push({ kind, span: sSpan, keywordSpan: tokenSpan(kw), ...(value ? { value } : {}) });
    }
  }
  for (const s of c.sumsOfSquaresSetting ?? []) {
    const kw = firstReal(s.children.SumsOfSquares);
    const sSpan = nodeSpan(s);
    if (kw === undefined || sSpan === undefined) continue;
    const value = b.nameFromToken(firstReal(s.children.NameToken) ?? firstReal(s.children.NumberLiteral));
    settings.push({ kind: "sums-of-squares", span: sSpan, keywordSpan: tokenSpan(kw), ...(value ? { value } : {}) });
  }
  for (const s of c.modelSetting ?? []) {
    const kw = firstReal(s.children.Model);
    const sSpan = nodeSpan(s);
    if (kw === undefined || sSpan === undefined) continue;
    const terms: ModelTerm[] = [];
    for (const t of s.children.term ?? []) {
      const term = b.term(t);
      if (term !== undefined) terms.push(term);
    }
    settings.push({ kind: "model", span: sSpan, keywordSpan: tokenSpan(kw), terms });
  }
  for (const s of c.detectSetting ?? []) {
    const kw = firstReal(s.children.Detect);
    const sSpan = nodeSpan(s);
    if (kw === undefined || sSpan === undefined) continue;
    const response = b.name(s.children.name?.[0]);
    const difference = b.number(s.children.NumberLiteral?.[0]);
    settings.push({
      kind: "detect",
      span: sSpan,
      keywordSpan: tokenSpan(kw),
      ...(response ? { response } : {}),
      ...(difference ? { difference } : {}),
    });
  }
  for (const s of c.sigmaSetting ?? []) {
    const kw = firstReal(s.children.Sigma);
    const sSpan = nodeSpan(s);
    if (kw === undefined || sSpan === undefined) continue;
    const response = b.name(s.children.name?.[0]);
    const value = b.number(s.children.NumberLiteral?.[0]);
    settings.push({
      kind: "sigma",
      span: sSpan,
      keywordSpan: tokenSpan(kw),
      ...(response ? { response } : {}),
      ...(value ? { value } : {}),
    });
  }
  for (const s of c.pairwiseSetting ?? []) {
    const kw = firstReal(s.children.Pairwise);
    const sSpan = nodeSpan(s);
    if (kw === undefined || sSpan === undefined) continue;
    const term = b.term(s.children.term?.[0]);
    settings.push({ kind: "pairwise", span: sSpan, keywordSpan: tokenSpan(kw), ...(term ? { term } : {}) });
  }
  for (const s of c.fractionSetting ?? []) {
    const kw = firstReal(s.children.Fraction);
    const sSpan = nodeSpan(s);
    if (kw === undefined || sSpan === undefined) continue;
    const generated = b.name(s.children.name?.[0]);
    const generator = b.term(s.children.term?.[0]);
    settings.push({
      kind: "fraction",
      span: sSpan,
      keywordSpan: tokenSpan(kw),
      ...(generated ? { generated } : {}),
      ...(generator ? { generator } : {}),
    });
  }
  settings.sort((x, y) => x.span.start - y.span.start);
  return { kind: "plan", span, keywordSpan: tokenSpan(keyword), settings };
}

function runsTable(b: Builder, node: RunsTableCstNode): RunsTable | undefined {
  const c = node.children;
  const keyword = firstReal(c.Runs);
  if (keyword === undefined) return undefined;
  const headerTokens: IToken[] = [];
  for (const list of [c.HeaderWord, c.StringLiteral, c.UnterminatedString, c.Pipe]) {
    for (const t of list ?? []) if (real(t)) headerTokens.push(t);
  }
  headerTokens.sort((x, y) => x.startOffset - y.startOffset);
  const columns: Name[] = [];
  let responseStart = -1;
  let end = tokenEnd(keyword);
  for (const t of headerTokens) {
    end = Math.max(end, tokenEnd(t));
    if (t.tokenType.name === "Pipe") {
      if (responseStart < 0) responseStart = columns.length;
      else b.report("a second '|' in the runs header: one '|' separates factor columns from response columns", tokenSpan(t));
      continue;
    }
    const name = b.nameFromToken(t);
    if (name === undefined) continue;
    if (!name.quoted && !IDENTIFIER.test(name.text)) {
      b.report(
        `'${name.text}' is not a valid column name: use letters, digits, '-' and '_' (starting with a letter), or quote it`,
        name.span,
      );
    } else if (!name.quoted && isTopLevelKeyword(name.text)) {
      b.report(`'${name.text}' is a reserved word: write "${name.text}" in quotes to use it as a column name`, name.span);
    }
    columns.push(name);
  }
  if (columns.length === 0) {
    b.report("expected column names after 'runs' on the same line, e.g. 'runs id temp | strength'", tokenSpan(keyword));
  }
  const headerHasPipe = responseStart >= 0;
  const body = firstReal(c.RunsBody);
  const bodyStart = body === undefined ? end : body.startOffset;
  const bodyEnd = body === undefined ? end : tokenEnd(body);
  // The lexer's `RunsBody` matcher has already read the body (one pass finds its end and its rows, or for
  // a plain body only its end); scan here only for a token that came without that payload.
  const payload = body?.payload as RunsBodyScan | PlainRunsBody | undefined;
  const head = (end: number) => ({
    kind: "runs" as const,
    span: { start: keyword.startOffset, end },
    keywordSpan: tokenSpan(keyword),
    columns,
    responseStart: headerHasPipe ? responseStart : columns.length,
    headerHasPipe,
  });
  if (payload !== undefined && payload.end === bodyEnd && !("rows" in payload)) {
    const withPipe = payload.rowsWithPipe;
    // A plain body has no problem of its own; one whose rows disagree with the header about `|` is read
    // in full below, for the problems' places.
    if (headerHasPipe ? withPipe === payload.rowCount : withPipe === 0) {
      if (payload.lastRowEnd >= 0) end = Math.max(end, payload.lastRowEnd);
      const source = b.source;
      let rows: RunRows | undefined;
      return {
        ...head(end),
        get rows(): RunRows {
          return (rows ??= scanRunsTable(source, bodyStart, bodyEnd).rows);
        },
        rowCount: payload.rowCount,
        plainBody: { start: bodyStart, end: bodyEnd },
        ...(payload.middleRow > 0 ? { plainMiddle: { row: payload.middleRow, offset: payload.middleOffset } } : {}),
      };
    }
  }
  const scan = payload !== undefined && payload.end === bodyEnd && "rows" in payload ? payload : scanRunsTable(b.source, bodyStart, bodyEnd);
  for (const p of runsBodyProblems(scan, headerHasPipe)) b.problems.push(p);
  const rows = scan.rows;
  // Rows are in text order and each ends before the next starts, so the last row ends furthest.
  if (rows.count > 0) end = Math.max(end, rows.rowEnd[rows.count - 1]!);
  return { ...head(end), rows, rowCount: rows.count };
}

function textBlockDecl(b: Builder, node: TextBlockDeclCstNode): TextBlockDecl | undefined {
  const c = node.children;
  const conjecture = firstReal(c.Conjecture);
  const keyword = conjecture ?? firstReal(c.Conclusion);
  const span = nodeSpan(node);
  if (keyword === undefined || span === undefined) return undefined;
  let body: TextValue | undefined;
  const block = firstReal(c.TextBlock);
  const open = firstReal(c.UnterminatedTextBlock);
  const str = firstReal(c.StringLiteral) ?? firstReal(c.UnterminatedString);
  // Line breaks inside a block are normalised to `\n`, so a CRLF file gives the same text.
  if (block !== undefined) body = { text: block.image.slice(3, -3).replace(/\r\n?/g, "\n"), span: tokenSpan(block) };
  else if (open !== undefined) body = { text: open.image.slice(3).replace(/\r\n?/g, "\n"), span: tokenSpan(open) };
  else if (str !== undefined) body = b.nameFromToken(str);
  if (body !== undefined && "quoted" in body) body = { text: body.text, span: body.span };
  return {
    kind: conjecture !== undefined ? "conjecture" : "conclusion",
    span,
    keywordSpan: tokenSpan(keyword),
    ...(body ? { body } : {}),
  };
}

function textValue(b: Builder, node: TextValueCstNode | undefined): TextValue | undefined {
  return b.textFromName(node);
}

function dateValue(b: Builder, node: DateLineCstNode): TextValue | undefined {
  const c = node.children;
  const date = firstReal(c.DateLiteral);
  if (date !== undefined) return { text: date.image, span: tokenSpan(date) };
  const name = b.nameFromToken(firstReal(c.StringLiteral) ?? firstReal(c.UnterminatedString));
  return name === undefined ? undefined : { text: name.text, span: name.span };
}

/**
 * Builds the `TrialFile` of `source` from the parser's CST. Problems found here (duplicates, missing
 * levels, runs-table syntax) are appended to `problems`, which the caller has filled with lexer and parser
 * problems; the result lists them sorted by position.
 */
export function buildTrialFile(source: string, cst: TrialFileCstNode, problems: readonly SyntaxProblem[]): TrialFile {
  const b = new Builder(source);
  const c = cst.children;
  const header: { title?: TextValue; owner?: TextValue; date?: TextValue } = {};

  const headerLine = <N extends CstNode>(
    nodes: N[] | undefined,
    key: "title" | "owner" | "date",
    word: string,
    read: (n: N) => TextValue | undefined,
  ): void => {
    let seen = false;
    for (const n of nodes ?? []) {
      const span = nodeSpan(n);
      if (span === undefined) continue;
      if (seen) {
        b.report(`only one ${word} line per file: remove this one or merge it into the first`, span);
        continue;
      }
      // The first line counts even when its value is missing, so a later line is still a duplicate.
      seen = true;
      const value = read(n);
      if (value !== undefined) header[key] = value;
    }
  };
  headerLine(c.titleLine, "title", "trial", (n) => textValue(b, n.children.textValue?.[0]));
  headerLine(c.ownerLine, "owner", "owner", (n) => textValue(b, n.children.textValue?.[0]));
  headerLine(c.dateLine, "date", "date", (n) => dateValue(b, n));

  const declarations: Declaration[] = [];
  for (const n of c.responseDecl ?? []) {
    const d = responseDecl(b, n);
    if (d) declarations.push(d);
  }
  for (const n of c.factorDecl ?? []) {
    const d = factorDecl(b, n);
    if (d) declarations.push(d);
  }
  for (const n of c.covariateDecl ?? []) {
    const d = covariateDecl(b, n);
    if (d) declarations.push(d);
  }
  for (const n of c.planBlock ?? []) {
    const d = planBlock(b, n);
    if (d) declarations.push(d);
  }
  for (const n of c.runsTable ?? []) {
    const d = runsTable(b, n);
    if (d) declarations.push(d);
  }
  for (const n of c.textBlockDecl ?? []) {
    const d = textBlockDecl(b, n);
    if (d) declarations.push(d);
  }
  declarations.sort((x, y) => x.span.start - y.span.start);

  let plan: PlanBlock | undefined;
  let runs: RunsTable | undefined;
  let conjecture: TextBlockDecl | undefined;
  let conclusion: TextBlockDecl | undefined;
  const responses: ResponseDecl[] = [];
  const factors: FactorDecl[] = [];
  const covariates: CovariateDecl[] = [];
  for (const d of declarations) {
    switch (d.kind) {
      case "response":
        responses.push(d);
        break;
      case "factor":
        factors.push(d);
        break;
      case "covariate":
        covariates.push(d);
        break;
      case "plan":
        if (plan === undefined) plan = d;
        else b.report("only one plan per file: move these settings into the first plan block", d.keywordSpan);
        break;
      case "runs":
        if (runs === undefined) runs = d;
        else b.report("only one runs table per file: merge these rows into the first table", d.keywordSpan);
        break;
      case "conjecture":
        if (conjecture === undefined) conjecture = d;
        else b.report("only one conjecture block per file: merge this text into the first one", d.keywordSpan);
        break;
      case "conclusion":
        if (conclusion === undefined) conclusion = d;
        else b.report("only one conclusion block per file: merge this text into the first one", d.keywordSpan);
        break;
    }
  }

  const all = sortProblems([...problems, ...b.problems]);
  const trialHeader: TrialHeader = header;
  return {
    source,
    header: trialHeader,
    declarations,
    responses,
    factors,
    covariates,
    ...(plan ? { plan } : {}),
    ...(runs ? { runs } : {}),
    ...(conjecture ? { conjecture } : {}),
    ...(conclusion ? { conclusion } : {}),
    problems: all,
  };
}

/** Sorts problems by position and drops exact duplicates (recovery can report one spot twice). */
function sortProblems(problems: SyntaxProblem[]): SyntaxProblem[] {
  const sorted = problems
    .map((p, i) => ({ p, i }))
    .sort((x, y) => x.p.span.start - y.p.span.start || x.p.span.end - y.p.span.end || x.i - y.i)
    .map((x) => x.p);
  const out: SyntaxProblem[] = [];
  for (const p of sorted) {
    const last = out[out.length - 1];
    if (last && last.span.start === p.span.start && last.span.end === p.span.end && last.message === p.message) continue;
    out.push(p);
  }
  return out;
}

/** Problems the lexer's tokens show on their own: unterminated strings and text blocks. */
export function lexingProblems(lexed: ILexingResult): SyntaxProblem[] {
  const out: SyntaxProblem[] = [];
  for (const t of lexed.tokens) {
    const name = t.tokenType.name;
    if (name === "UnterminatedString") {
      out.push(problem("unterminated string: add the closing quote '\"' on the same line", tokenSpan(t)));
    } else if (name === "UnterminatedTextBlock") {
      out.push(
        problem('unterminated text block: add a closing """ (on a line of its own, before the next declaration)', {
          start: t.startOffset,
          end: t.startOffset + 3,
        }),
      );
    }
  }
  // The lexer has a catch-all token, so it reports no errors in practice; keep any it does report.
  for (const e of lexed.errors) {
    out.push(problem("unexpected characters: remove them", { start: e.offset, end: e.offset + e.length }));
  }
  return out;
}

/**
 * Turns the parser's recognition errors into problems with useful spans: a missing piece at the end of a
 * line is reported just after the last token the user wrote; text that cannot start a declaration is
 * reported over everything skipped.
 */
export function parsingProblems(
  source: string,
  tokens: readonly IToken[],
  errors: readonly IRecognitionException[],
): SyntaxProblem[] {
  const out: SyntaxProblem[] = [];
  for (const e of errors) {
    const token = e.token;
    const previous = (e as IRecognitionException & { previousToken?: IToken }).previousToken;
    const topLevel = e.context.ruleStack.length <= 1;
    const tokenIsReal = real(token) !== undefined && token.tokenType !== EOF;
    let span: Span;
    if (topLevel && tokenIsReal) {
      // Recovery skips to the next token that can start a declaration: report everything skipped.
      span = { start: token.startOffset, end: skippedEnd(tokens, token) };
    } else if (previous !== undefined && real(previous) && (!tokenIsReal || lineBreakBetween(source, tokenEnd(previous), token.startOffset))) {
      const at = tokenEnd(previous);
      span = { start: at, end: at };
    } else if (tokenIsReal) {
      span = tokenSpan(token);
    } else {
      span = { start: source.length, end: source.length };
    }
    out.push(problem(e.message, span));
  }
  return out;
}

function lineBreakBetween(source: string, from: number, to: number): boolean {
  for (let i = from; i < to; i++) {
    const ch = source.charCodeAt(i);
    if (ch === 10 || ch === 13) return true;
  }
  return false;
}

/** The end of the last token before the first top-level keyword after `token` (or the last token). */
function skippedEnd(tokens: readonly IToken[], token: IToken): number {
  let lo = 0;
  let hi = tokens.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (tokens[mid]!.startOffset < token.startOffset) lo = mid + 1;
    else hi = mid;
  }
  let end = tokenEnd(token);
  for (let i = lo + 1; i < tokens.length; i++) {
    const t = tokens[i]!;
    if (isTopLevelKeyword(t.image) && t.tokenType.name !== "HeaderWord" && !t.tokenType.name.endsWith("String")) break;
    end = tokenEnd(t);
  }
  return end;
}
