/** Decimal text as the runs table accepts it: optional sign, digits with an optional point, optional exponent. */
const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** True when `text` is a decimal number a user may type in a response or covariate cell. */
export function isDecimalText(text: string): boolean {
  return DECIMAL.test(text);
}
