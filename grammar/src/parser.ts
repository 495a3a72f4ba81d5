/**
 * The Chevrotain grammar of `.trial` files: a CST parser with error recovery, and error messages in our
 * own words (`TrialErrorMessages`), which say where the problem is and how to fix it.
 *
 * Declarations are newline-insensitive: every declaration and every plan setting starts with a keyword,
 * so a line break needs no token. The runs table body is one `RunsBody` token read by `runs-scanner.ts`.
 */
import {
  CstParser,
  EOF,
  tokenMatcher,
  type IParserErrorMessageProvider,
  type IToken,
  type TokenType,
} from "chevrotain";
import * as T from "./tokens.js";

/** What the parser is reading, kept up to date by the rules so error messages can name it. */
interface ErrorContext {
  source: string;
  /** The declaration being read, e.g. `factor 'temp'`. */
  where: string;
  /** What the next name or level is, e.g. `a level name`. */
  expect: string;
}

const TOP_LEVEL_LIST = `${T.TOP_LEVEL_KEYWORDS.slice(0, -1).join(", ")} or ${T.TOP_LEVEL_KEYWORDS[T.TOP_LEVEL_KEYWORDS.length - 1]}`;
const PLAN_SETTING_WORDS: ReadonlySet<string> = new Set(T.PLAN_SETTING_KEYWORDS);
const OPTION_WORDS = new Set(["levels", "unit", "as", "control", "within", "maximize", "minimize", "target", "spec"]);

function quoteImage(token: IToken): string {
  return token.image.length > 40 ? `${token.image.slice(0, 37)}...` : token.image;
}

/** True when there is a line break between the end of `previous` and the start of `actual`. */
function onLaterLine(source: string, previous: IToken, actual: IToken): boolean {
  if (actual.tokenType === EOF || Number.isNaN(actual.startOffset)) return true;
  if (previous === undefined || Number.isNaN(previous.startOffset)) return false;
  // With `positionTracking: "onlyOffset"` tokens carry no end offset: the image length gives it.
  const between = source.slice(previous.startOffset + previous.image.length, actual.startOffset);
  return between.includes("\n") || between.includes("\r");
}

/** Describes a token type the parser expected, in the words of the rule that expected it. */
function describeExpected(expected: TokenType, ruleName: string, context: ErrorContext): string {
  switch (expected) {
    case T.NumberLiteral:
      if (ruleName === "targetClause") return "a target value (a number)";
      if (ruleName === "detectSetting") return "the smallest difference worth detecting (a number)";
      if (ruleName === "sigmaSetting") return "the planned error standard deviation (a number)";
      return "a number";
    case T.To:
      return "'to' and an upper limit (spec 0.35 to 0.45)";
    case T.Equals:
      return "'=' and the generator (fraction d = a x b x c)";
    case T.NameToken:
      return context.expect;
    case EOF:
      return "the end of the file";
    default:
      return `'${expected.name.toLowerCase()}'`;
  }
}

/** What a rule that chooses between alternatives expected, for "no viable alternative" errors. */
function describeRule(ruleName: string, context: ErrorContext): string {
  switch (ruleName) {
    case "name":
      return context.expect;
    case "level":
      return context.expect;
    case "textValue":
      return 'a quoted text such as "Cure profile study"';
    case "dateLine":
      return "a date such as 2026-11-20";
    case "textBlockDecl":
      return 'a text block: """ on this line, the text, then """ on a line of its own';
    case "roleClause":
      return "block, random or subject";
    case "specClause":
      return "'>= number', '<= number' or a range 'low to high'";
    case "sumsOfSquaresSetting":
      return "I, II or III";
    default:
      return "something else";
  }
}

/**
 * The message for a token that cannot start a declaration, found between declarations.
 */
function topLevelMessage(actual: IToken): string {
  const image = quoteImage(actual);
  if (tokenMatcher(actual, T.Identifier)) {
    return `unknown keyword '${image}': a declaration starts with ${TOP_LEVEL_LIST}`;
  }
  if (PLAN_SETTING_WORDS.has(actual.image)) {
    return `'${image}' is a plan setting: put it on its own line under 'plan'`;
  }
  if (OPTION_WORDS.has(actual.image)) {
    return `'${image}' must follow the declaration it belongs to on the same line (e.g. factor temp levels 150, 175)`;
  }
  return `unexpected '${image}': a declaration starts with ${TOP_LEVEL_LIST}`;
}

/** Builds the " found ..." tail of a message. */
function foundSuffix(context: ErrorContext, previous: IToken, actual: IToken): string {
  if (actual.tokenType === EOF) return "";
  if (onLaterLine(context.source, previous, actual)) return "";
  const suffix = `, found '${quoteImage(actual)}'`;
  if (T.isTopLevelKeyword(actual.image)) {
    return `${suffix} ('${actual.image}' is reserved: write "${actual.image}" in quotes to use it as a name)`;
  }
  return suffix;
}

function inWhere(context: ErrorContext): string {
  return context.where === "" ? "" : ` in ${context.where}`;
}

function afterPrevious(previous: IToken | undefined): string {
  return previous === undefined || previous.tokenType === EOF || previous.image === "" ? "" : ` after '${quoteImage(previous)}'`;
}

/** Error messages in Trialbook's words: what was expected, after what, in which declaration. */
class TrialErrorMessages implements IParserErrorMessageProvider {
  constructor(private readonly context: ErrorContext) {}

  buildMismatchTokenMessage(options: { expected: TokenType; actual: IToken; previous: IToken; ruleName: string }): string {
    if (options.ruleName === "trialFile") return topLevelMessage(options.actual);
    const { expected, actual, previous, ruleName } = options;
    return `expected ${describeExpected(expected, ruleName, this.context)}${afterPrevious(previous)}${inWhere(this.context)}${foundSuffix(this.context, previous, actual)}`;
  }

  buildNotAllInputParsedMessage(options: { firstRedundant: IToken; ruleName: string }): string {
    return topLevelMessage(options.firstRedundant);
  }

  buildNoViableAltMessage(options: {
    expectedPathsPerAlt: TokenType[][][];
    actual: IToken[];
    previous: IToken;
    customUserDescription?: string;
    ruleName: string;
  }): string {
    const actual = options.actual[0]!;
    if (options.ruleName === "trialFile") return topLevelMessage(actual);
    return `expected ${describeRule(options.ruleName, this.context)}${afterPrevious(options.previous)}${inWhere(this.context)}${foundSuffix(this.context, options.previous, actual)}`;
  }

  buildEarlyExitMessage(options: {
    expectedIterationPaths: TokenType[][];
    actual: IToken[];
    previous: IToken;
    customUserDescription?: string;
    ruleName: string;
  }): string {
    const actual = options.actual[0]!;
    return `expected ${describeRule(options.ruleName, this.context)}${afterPrevious(options.previous)}${inWhere(this.context)}${foundSuffix(this.context, options.previous, actual)}`;
  }
}

/**
 * The `.trial` CST parser. Rules are class properties, so a misspelled subrule fails to compile. Build it
 * once and reuse it: assigning `input` resets it (Chevrotain's guidance; construction analyses the grammar).
 */
export class TrialParser extends CstParser {
  private readonly context: ErrorContext;

  /** Creates the parser (grammar analysis included: costly, do it once). */
  constructor() {
    const context: ErrorContext = { source: "", where: "the file", expect: "a name" };
    super(T.ALL_TOKENS, {
      recoveryEnabled: true,
      errorMessageProvider: new TrialErrorMessages(context),
      skipValidations: T.SKIP_GRAMMAR_VALIDATIONS,
    });
    this.context = context;
    this.performSelfAnalysis();
  }

  /** Sets the text the tokens came from (used to tell "end of line" from "found X" in messages). */
  setSource(source: string): void {
    this.context.source = source;
    this.context.where = "the file";
    this.context.expect = "a name";
  }

  private setWhere(where: string): void {
    this.ACTION(() => {
      this.context.where = where;
    });
  }

  private setWhereNamed(kind: string): void {
    this.ACTION(() => {
      const last = this.LA(0);
      this.context.where = last.isInsertedInRecovery || last.image === "" ? kind : `${kind} ${quoteName(last.image)}`;
    });
  }

  private expectName(what: string): void {
    this.ACTION(() => {
      this.context.expect = what;
    });
  }

  /** The whole file: declarations in any order. */
  trialFile = this.RULE("trialFile", () => {
    this.MANY(() => {
      this.OR([
        { ALT: () => this.SUBRULE(this.titleLine) },
        { ALT: () => this.SUBRULE(this.ownerLine) },
        { ALT: () => this.SUBRULE(this.dateLine) },
        { ALT: () => this.SUBRULE(this.textBlockDecl) },
        { ALT: () => this.SUBRULE(this.responseDecl) },
        { ALT: () => this.SUBRULE(this.factorDecl) },
        { ALT: () => this.SUBRULE(this.covariateDecl) },
        { ALT: () => this.SUBRULE(this.planBlock) },
        { ALT: () => this.SUBRULE(this.runsTable) },
      ]);
    });
  });

  /** `trial "title"`. */
  titleLine = this.RULE("titleLine", () => {
    this.CONSUME(T.Trial);
    this.setWhere("the trial line");
    this.SUBRULE(this.textValue);
  });

  /** `owner "team"`. */
  ownerLine = this.RULE("ownerLine", () => {
    this.CONSUME(T.Owner);
    this.setWhere("the owner line");
    this.SUBRULE(this.textValue);
  });

  /** `date 2026-11-20`. */
  dateLine = this.RULE("dateLine", () => {
    this.CONSUME(T.DateKw);
    this.setWhere("the date line");
    this.OR([
      { ALT: () => this.CONSUME(T.DateLiteral) },
      { ALT: () => this.CONSUME(T.StringLiteral) },
      { ALT: () => this.CONSUME(T.UnterminatedString) },
    ]);
  });

  /** `conjecture """..."""` or `conclusion """..."""` (a one-line quoted string is accepted too). */
  textBlockDecl = this.RULE("textBlockDecl", () => {
    this.OR1([
      { ALT: () => this.CONSUME(T.Conjecture) },
      { ALT: () => this.CONSUME(T.Conclusion) },
    ]);
    this.ACTION(() => {
      this.context.where = `the ${this.LA(0).image} block`;
    });
    this.OR2([
      { ALT: () => this.CONSUME(T.TextBlock) },
      { ALT: () => this.CONSUME(T.UnterminatedTextBlock) },
      { ALT: () => this.CONSUME(T.StringLiteral) },
      { ALT: () => this.CONSUME(T.UnterminatedString) },
    ]);
  });

  /** A quoted text or a bare word (titles, owners). */
  textValue = this.RULE("textValue", () => {
    this.OR([
      { ALT: () => this.CONSUME(T.StringLiteral) },
      { ALT: () => this.CONSUME(T.UnterminatedString) },
      { ALT: () => this.CONSUME(T.NameToken) },
    ]);
  });

  /** A name: an identifier, a contextual keyword used as a name, or a quoted string. */
  name = this.RULE("name", () => {
    this.OR([
      { ALT: () => this.CONSUME(T.NameToken) },
      { ALT: () => this.CONSUME(T.StringLiteral) },
      { ALT: () => this.CONSUME(T.UnterminatedString) },
    ]);
  });

  /** A level: a name or a number. */
  level = this.RULE("level", () => {
    this.OR([
      { ALT: () => this.CONSUME(T.NameToken) },
      { ALT: () => this.CONSUME(T.StringLiteral) },
      { ALT: () => this.CONSUME(T.UnterminatedString) },
      { ALT: () => this.CONSUME(T.NumberLiteral) },
    ]);
  });

  /** `response NAME` then options in any order: unit, maximize, minimize, target N, spec. */
  responseDecl = this.RULE("responseDecl", () => {
    this.CONSUME(T.Response);
    this.setWhere("");
    this.expectName("a response name");
    this.SUBRULE(this.name);
    this.setWhereNamed("response");
    this.MANY(() => {
      this.OR([
        { ALT: () => this.SUBRULE(this.unitClause) },
        { ALT: () => this.CONSUME(T.Maximize) },
        { ALT: () => this.CONSUME(T.Minimize) },
        { ALT: () => this.SUBRULE(this.targetClause) },
        { ALT: () => this.SUBRULE(this.specClause) },
      ]);
    });
  });

  /** `unit MPa` or `unit "%"`. */
  unitClause = this.RULE("unitClause", () => {
    this.CONSUME(T.Unit);
    this.expectName('a unit (a word such as MPa, or quoted text such as "%")');
    this.SUBRULE(this.name);
  });

  /** `target 0.40`. */
  targetClause = this.RULE("targetClause", () => {
    this.CONSUME(T.Target);
    this.CONSUME(T.NumberLiteral);
  });

  /** `spec >= 18`, `spec <= 2.5` or `spec 0.35 to 0.45`. */
  specClause = this.RULE("specClause", () => {
    this.CONSUME(T.Spec);
    this.OR([
      {
        ALT: () => {
          this.CONSUME(T.GreaterEqual);
          this.CONSUME1(T.NumberLiteral);
        },
      },
      {
        ALT: () => {
          this.CONSUME(T.LessEqual);
          this.CONSUME2(T.NumberLiteral);
        },
      },
      {
        ALT: () => {
          this.CONSUME3(T.NumberLiteral);
          this.CONSUME(T.To);
          this.CONSUME4(T.NumberLiteral);
        },
      },
    ]);
  });

  /** `factor NAME` then clauses in any order: levels, unit, as ROLE, control LEVEL, within FACTOR. */
  factorDecl = this.RULE("factorDecl", () => {
    this.CONSUME(T.Factor);
    this.setWhere("");
    this.expectName("a factor name");
    this.SUBRULE(this.name);
    this.setWhereNamed("factor");
    this.MANY(() => {
      this.OR([
        { ALT: () => this.SUBRULE(this.levelsClause) },
        { ALT: () => this.SUBRULE(this.unitClause) },
        { ALT: () => this.SUBRULE(this.roleClause) },
        { ALT: () => this.SUBRULE(this.controlClause) },
        { ALT: () => this.SUBRULE(this.withinClause) },
      ]);
    });
  });

  /** `levels a, b, c` or `levels 150, 175, 200`. */
  levelsClause = this.RULE("levelsClause", () => {
    this.CONSUME(T.Levels);
    this.expectName("a level name");
    this.SUBRULE1(this.level);
    this.MANY(() => {
      this.CONSUME(T.Comma);
      this.expectName("a level name");
      this.SUBRULE2(this.level);
    });
  });

  /** `as block`, `as random` or `as subject`. */
  roleClause = this.RULE("roleClause", () => {
    this.CONSUME(T.As);
    this.OR([
      { ALT: () => this.CONSUME(T.Block) },
      { ALT: () => this.CONSUME(T.Random) },
      { ALT: () => this.CONSUME(T.Subject) },
    ]);
  });

  /** `control LEVEL`. */
  controlClause = this.RULE("controlClause", () => {
    this.CONSUME(T.Control);
    this.expectName("the control level");
    this.SUBRULE(this.level);
  });

  /** `within FACTOR`. */
  withinClause = this.RULE("withinClause", () => {
    this.CONSUME(T.Within);
    this.expectName("the name of the factor it is nested in");
    this.SUBRULE(this.name);
  });

  /** `covariate NAME [unit U]`. */
  covariateDecl = this.RULE("covariateDecl", () => {
    this.CONSUME(T.Covariate);
    this.setWhere("");
    this.expectName("a covariate name");
    this.SUBRULE(this.name);
    this.setWhereNamed("covariate");
    this.MANY(() => {
      this.SUBRULE(this.unitClause);
    });
  });

  /** `plan` then settings, one per line by convention. */
  planBlock = this.RULE("planBlock", () => {
    this.CONSUME(T.Plan);
    this.setWhere("the plan");
    this.MANY(() => {
      this.OR([
        { ALT: () => this.SUBRULE(this.numericSetting) },
        { ALT: () => this.SUBRULE(this.sumsOfSquaresSetting) },
        { ALT: () => this.SUBRULE(this.modelSetting) },
        { ALT: () => this.SUBRULE(this.detectSetting) },
        { ALT: () => this.SUBRULE(this.pairwiseSetting) },
        { ALT: () => this.SUBRULE(this.fractionSetting) },
        { ALT: () => this.SUBRULE(this.sigmaSetting) },
      ]);
    });
  });

  /** `replicates 3`, `alpha 0.05`, `confidence 0.95`, `power 0.8`, `seed 4187`, `centre-points 3`. */
  numericSetting = this.RULE("numericSetting", () => {
    this.OR([
      { ALT: () => this.CONSUME(T.Replicates) },
      { ALT: () => this.CONSUME(T.Alpha) },
      { ALT: () => this.CONSUME(T.Confidence) },
      { ALT: () => this.CONSUME(T.Power) },
      { ALT: () => this.CONSUME(T.Seed) },
      { ALT: () => this.CONSUME(T.CentrePoints) },
    ]);
    this.ACTION(() => {
      this.context.where = `the plan setting '${this.LA(0).image}'`;
    });
    this.CONSUME(T.NumberLiteral);
  });

  /** `sums-of-squares III`. */
  sumsOfSquaresSetting = this.RULE("sumsOfSquaresSetting", () => {
    this.CONSUME(T.SumsOfSquares);
    this.setWhere("the plan setting 'sums-of-squares'");
    this.OR([{ ALT: () => this.CONSUME(T.NameToken) }, { ALT: () => this.CONSUME(T.NumberLiteral) }]);
  });

  /** `model a, b, a x b`. */
  modelSetting = this.RULE("modelSetting", () => {
    this.CONSUME(T.Model);
    this.setWhere("the plan setting 'model'");
    this.SUBRULE1(this.term);
    this.MANY(() => {
      this.CONSUME(T.Comma);
      this.SUBRULE2(this.term);
    });
  });

  /** A model term: `a` or `a x b x c`. */
  term = this.RULE("term", () => {
    this.expectName("a factor or covariate name");
    this.SUBRULE1(this.name);
    this.MANY(() => {
      this.CONSUME(T.Cross);
      this.expectName("a factor name");
      this.SUBRULE2(this.name);
    });
  });

  /** `detect strength 1.5`. */
  detectSetting = this.RULE("detectSetting", () => {
    this.CONSUME(T.Detect);
    this.setWhere("the plan setting 'detect'");
    this.expectName("a response name");
    this.SUBRULE(this.name);
    this.CONSUME(T.NumberLiteral);
  });

  /** `sigma strength 1.2`: the planned error standard deviation of a response, used for power before data exist. */
  sigmaSetting = this.RULE("sigmaSetting", () => {
    this.CONSUME(T.Sigma);
    this.setWhere("the plan setting 'sigma'");
    this.expectName("a response name");
    this.SUBRULE(this.name);
    this.CONSUME(T.NumberLiteral);
  });

  /** `pairwise a x b`. */
  pairwiseSetting = this.RULE("pairwiseSetting", () => {
    this.CONSUME(T.Pairwise);
    this.setWhere("the plan setting 'pairwise'");
    this.SUBRULE(this.term);
  });

  /** `fraction d = a x b x c`. */
  fractionSetting = this.RULE("fractionSetting", () => {
    this.CONSUME(T.Fraction);
    this.setWhere("the plan setting 'fraction'");
    this.expectName("the name of the generated factor");
    this.SUBRULE(this.name);
    this.CONSUME(T.Equals);
    this.SUBRULE(this.term);
  });

  /** `runs` header line (names and one `|`), then the table body as one token. */
  runsTable = this.RULE("runsTable", () => {
    this.CONSUME(T.Runs);
    this.setWhere("the runs header");
    this.MANY(() => {
      this.OR([
        { ALT: () => this.CONSUME(T.HeaderWord) },
        { ALT: () => this.CONSUME(T.StringLiteral) },
        { ALT: () => this.CONSUME(T.UnterminatedString) },
        { ALT: () => this.CONSUME(T.Pipe) },
      ]);
    });
    this.OPTION(() => {
      this.CONSUME(T.RunsBody);
    });
  });
}

function quoteName(image: string): string {
  return image.startsWith('"') ? image : `'${image}'`;
}

let parser: TrialParser | undefined;

/** The one parser instance, built on first use and reused for every parse. */
export function trialParser(): TrialParser {
  parser ??= new TrialParser();
  return parser;
}
