/**
 * A reader for comma-separated values as described by RFC 4180 (Shafranovich, 2005).
 *
 * Written by hand rather than taken from a package because it is small (one pass over the text),
 * must keep every field's text exactly as written (no number conversion, no trimming: the importer
 * copies decimal text into the `.trial` file unchanged), and must report problems with line numbers
 * instead of throwing; no dependency is needed for that.
 *
 * Accepted beyond the letter of RFC 4180, as spreadsheet exports need:
 * - a byte-order mark (U+FEFF) at the start is skipped;
 * - line breaks may be CRLF, LF or a lone CR;
 * - blank lines (empty or only spaces/tabs, outside quotes) are skipped;
 * - the last record may lack a final line break.
 *
 * Supported as RFC 4180 says: quoted fields may hold the delimiter, doubled quotes (`""` is one `"`)
 * and line breaks. A record that spans lines is reported at the line where it starts; its field
 * keeps the line break exactly as written. (Whether such a field can be used is the caller's
 * decision: `csvToTrial` rejects it, because a `.trial` cell is one line.)
 *
 * Problems (never exceptions): a quote inside an unquoted field, text after a closing quote,
 * a quoted field that is never closed, a record whose field count differs from the header's.
 * A record with a problem is left out of `rows`.
 */

/** One data record: its 1-based starting line in the text and its fields, exactly as written (unquoted). */
export interface CsvRow {
  readonly line: number;
  readonly fields: string[];
}

/** Something wrong in the CSV text, at a 1-based line. */
export interface CsvProblem {
  readonly line: number;
  readonly message: string;
}

/**
 * The records of a CSV text. `header` is the first non-blank record (empty when the text has none);
 * `headerLine` is its 1-based line (0 when there is no header).
 */
export interface CsvTable {
  readonly header: string[];
  readonly headerLine: number;
  readonly rows: CsvRow[];
  readonly problems: CsvProblem[];
}

/** Options of `readCsv`. */
export interface CsvOptions {
  /** The field delimiter, one character; default `,`. Semicolon and tab are common in other locales. */
  readonly delimiter?: string;
}

/**
 * Reads CSV text into a header and data rows, with each record's 1-based starting line.
 * Never throws; anything that cannot be read is listed in `problems` with its line.
 */
export function readCsv(text: string, options: CsvOptions = {}): CsvTable {
  const problems: CsvProblem[] = [];
  const delimiter = options.delimiter ?? ",";
  if (delimiter.length !== 1 || delimiter === '"' || delimiter === "\r" || delimiter === "\n") {
    problems.push({ line: 1, message: `the delimiter must be one character other than a quote or a line break, not ${JSON.stringify(delimiter)}` });
    return { header: [], headerLine: 0, rows: [], problems };
  }
  const delim = delimiter.charCodeAt(0);
  const n = text.length;
  let i = text.charCodeAt(0) === 0xfeff ? 1 : 0;
  let line = 1;
  let header: string[] | undefined;
  let headerLine = 0;
  const rows: CsvRow[] = [];

  while (i < n) {
    const recordLine = line;
    const fields: string[] = [];
    let recordOk = true;
    let sawQuote = false;
    // One record: fields until a line break outside quotes or the end of the text.
    for (;;) {
      let field: string;
      if (text.charCodeAt(i) === 0x22 /* " */) {
        sawQuote = true;
        const fieldLine = line;
        i++;
        const parts: string[] = [];
        let closed = false;
        while (i < n) {
          const q = text.indexOf('"', i);
          const end = q < 0 ? n : q;
          line += countLineBreaks(text, i, end);
          parts.push(text.slice(i, end));
          if (q < 0) {
            i = n;
            break;
          }
          if (text.charCodeAt(q + 1) === 0x22) {
            parts.push('"');
            i = q + 2;
          } else {
            i = q + 1;
            closed = true;
            break;
          }
        }
        field = parts.join("");
        if (!closed) {
          problems.push({ line: fieldLine, message: "a quoted field is never closed: add the closing double quote" });
          recordOk = false;
        } else if (i < n && !isRecordEnd(text, i, delim)) {
          const stop = scanUnquoted(text, i, delim);
          problems.push({
            line,
            message: `text after a closing quote (${JSON.stringify(text.slice(i, stop))}); put the whole field in quotes and double any quote inside it`,
          });
          field += text.slice(i, stop);
          i = stop;
          recordOk = false;
        }
      } else {
        const stop = scanUnquoted(text, i, delim);
        field = text.slice(i, stop);
        if (field.includes('"')) {
          problems.push({ line, message: `a double quote inside an unquoted field (${JSON.stringify(field)}); put the whole field in quotes and double the quote` });
          recordOk = false;
        }
        i = stop;
      }
      fields.push(field);
      if (i < n && text.charCodeAt(i) === delim) {
        i++;
        // A delimiter right before a line break or the end leaves one more, empty field.
        if (i >= n || isLineBreak(text.charCodeAt(i))) fields.push("");
        else continue;
      }
      if (i < n) i = skipLineBreak(text, i);
      line++;
      break;
    }

    if (!sawQuote && fields.length === 1 && isBlank(fields[0] ?? "")) continue;
    if (header === undefined) {
      header = fields;
      headerLine = recordLine;
      continue;
    }
    if (fields.length !== header.length) {
      problems.push({
        line: recordLine,
        message: `this row has ${fields.length} field${fields.length === 1 ? "" : "s"} but the header has ${header.length}`,
      });
      recordOk = false;
    }
    if (recordOk) rows.push({ line: recordLine, fields });
  }
  return { header: header ?? [], headerLine, rows, problems };
}

function isLineBreak(c: number): boolean {
  return c === 0x0a || c === 0x0d;
}

function isRecordEnd(text: string, i: number, delim: number): boolean {
  const c = text.charCodeAt(i);
  return c === delim || isLineBreak(c);
}

/** Index of the first delimiter or line break at or after `i`, or the text length. */
function scanUnquoted(text: string, i: number, delim: number): number {
  const n = text.length;
  while (i < n) {
    const c = text.charCodeAt(i);
    if (c === delim || c === 0x0a || c === 0x0d) return i;
    i++;
  }
  return n;
}

/** Skips one line break (CRLF, LF or CR) at `i`. */
function skipLineBreak(text: string, i: number): number {
  if (text.charCodeAt(i) === 0x0d && text.charCodeAt(i + 1) === 0x0a) return i + 2;
  return i + 1;
}

/** Number of line breaks (CRLF, LF or a lone CR each count once) in `text[from, to)`. */
function countLineBreaks(text: string, from: number, to: number): number {
  let count = 0;
  for (let k = from; k < to; k++) {
    const c = text.charCodeAt(k);
    if (c === 0x0a) count++;
    else if (c === 0x0d && text.charCodeAt(k + 1) !== 0x0a) count++;
  }
  return count;
}

function isBlank(s: string): boolean {
  for (let k = 0; k < s.length; k++) {
    const c = s.charCodeAt(k);
    if (c !== 0x20 && c !== 0x09) return false;
  }
  return true;
}
