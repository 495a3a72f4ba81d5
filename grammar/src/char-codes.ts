/**
 * The character codes the readers of a runs table compare with (the row scanner, the quick pass over
 * plain bodies, the keyword-line test, the lexer's body matcher and the model builder's plain reader).
 * A const enum, so that every comparison compiles to the number in place, as a local constant did.
 */
export const enum Char {
  Tab = 9,
  LF = 10,
  CR = 13,
  Space = 32,
  Quote = 34,
  Hash = 35,
  Plus = 43,
  Minus = 45,
  Point = 46,
  Question = 63,
  Backslash = 92,
  Pipe = 124,
  BOM = 0xfeff,
}
