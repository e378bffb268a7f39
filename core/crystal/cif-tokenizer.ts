/**
 * Reading the syntax of a CIF 1.1 file into data blocks of items and loops.
 *
 * Follows the IUCr CIF 1.1 syntax specification (S. R. Hall, F. H. Allen and
 * I. D. Brown, Acta Cryst. A47 (1991) 655; "CIF 1.1 syntax specification",
 * International Tables for Crystallography Vol. G (2006), ch. 2.2):
 *
 * - `data_NAME` opens a data block; tags (`_cell_length_a`) and block names are
 *   case-insensitive, so both are stored lower-cased.
 * - A tag is followed by one value; `loop_` is followed by one or more tags and
 *   then values, row by row (their number must be a multiple of the tags').
 * - Values: unquoted strings; strings in '...' or "..." (a quote closes the
 *   string only when whitespace or the end of the line follows it, so
 *   'it's' is the value `it's`); text fields from a line starting with `;`
 *   to the next line starting with `;`; a bare `?` (unknown) and `.`
 *   (inapplicable).
 * - `#` outside a value starts a comment that runs to the end of the line.
 * - `save_`, `global_` and `stop_` are reserved: save frames belong to
 *   dictionaries, not data files, and are rejected here with a clear message.
 *
 * Numbers with a standard uncertainty in parentheses (`4.0782(3)`) are read by
 * `parseCifNumber`.
 */

import { PhaseInputError } from './phase-input-error';

/** How a value was written: a bare `?` is 'unknown', a bare `.` is 'inapplicable'. */
export type CifValueKind = 'unquoted' | 'quoted' | 'text-field' | 'unknown' | 'inapplicable';

export interface CifValue {
  /** The value's characters without quotes or the text field's semicolons. */
  text: string;
  kind: CifValueKind;
  /** 1-based line where the value starts. */
  line: number;
}

export interface CifLoop {
  /** Tags of the loop's columns, lower-cased, in file order. */
  tags: string[];
  /** Rows of values, each as long as `tags`. */
  rows: CifValue[][];
  /** 1-based line of `loop_`. */
  line: number;
}

export interface CifBlock {
  /** Block name after `data_`, lower-cased. */
  name: string;
  /** Block name as written in the file. */
  displayName: string;
  /** 1-based line of the `data_` header. */
  line: number;
  /** Tag-value pairs outside loops, keyed by lower-cased tag. */
  items: Map<string, CifValue>;
  loops: CifLoop[];
}

export interface CifDocument {
  blocks: CifBlock[];
}

interface Token {
  kind: 'tag' | 'value' | 'data' | 'loop' | 'reserved';
  text: string;
  value?: CifValue;
  line: number;
}

const isSpace = (ch: string | undefined): boolean => ch === ' ' || ch === '\t' || ch === '\n';

/** Splits the text into tokens; throws PhaseInputError for unterminated strings and text fields. */
function tokenize(source: string, fail: (line: number, message: string) => never): Token[] {
  const text = source.replace(/\r\n?/g, '\n');
  const tokens: Token[] = [];
  let i = 0;
  let line = 1;
  const n = text.length;
  while (i < n) {
    const ch = text[i]!;
    if (ch === '\n') {
      line++;
      i++;
      continue;
    }
    if (ch === ' ' || ch === '\t') {
      i++;
      continue;
    }
    if (ch === '#') {
      while (i < n && text[i] !== '\n') i++;
      continue;
    }
    const atLineStart = i === 0 || text[i - 1] === '\n';
    if (ch === ';' && atLineStart) {
      // Text field: runs to the next line that starts with ';'.
      const startLine = line;
      const close = text.indexOf('\n;', i);
      if (close < 0) {
        fail(startLine, "unterminated text field (a line starting with ';' opens it; end it with a line starting with ';')");
      }
      const body = text.slice(i + 1, close);
      for (const c of body) if (c === '\n') line++;
      line++; // the newline before the closing ';'
      tokens.push({ kind: 'value', text: body, line: startLine, value: { text: body, kind: 'text-field', line: startLine } });
      i = close + 2;
      continue;
    }
    if (ch === "'" || ch === '"') {
      // Quoted string: closed by the same quote followed by whitespace or the end of the text.
      let j = i + 1;
      while (j < n) {
        if (text[j] === '\n') break;
        if (text[j] === ch && (j + 1 >= n || isSpace(text[j + 1]))) break;
        j++;
      }
      if (j >= n || text[j] === '\n') {
        fail(line, `unterminated quoted string (${ch}${text.slice(i + 1, Math.min(j, i + 31))}...): close it with ${ch} on the same line`);
      }
      const body = text.slice(i + 1, j);
      tokens.push({ kind: 'value', text: body, line, value: { text: body, kind: 'quoted', line } });
      i = j + 1;
      continue;
    }
    let j = i;
    while (j < n && !isSpace(text[j])) j++;
    const word = text.slice(i, j);
    const lower = word.toLowerCase();
    if (word.startsWith('_')) {
      tokens.push({ kind: 'tag', text: lower, line });
    } else if (lower.startsWith('data_')) {
      tokens.push({ kind: 'data', text: word.slice(5), line });
    } else if (lower === 'loop_') {
      tokens.push({ kind: 'loop', text: word, line });
    } else if (lower.startsWith('save_') || lower === 'global_' || lower === 'stop_') {
      tokens.push({ kind: 'reserved', text: word, line });
    } else {
      const kind: CifValueKind = word === '?' ? 'unknown' : word === '.' ? 'inapplicable' : 'unquoted';
      tokens.push({ kind: 'value', text: word, line, value: { text: word, kind, line } });
    }
    i = j;
  }
  return tokens;
}

/**
 * Parses CIF 1.1 text into its data blocks.
 *
 * @param text the whole file; any line ending (\n, \r\n, \r)
 * @param sourceName the file name used in error messages
 * @returns the blocks in file order (an empty list for a file with none)
 * @throws PhaseInputError `CIF "<sourceName>", line N: <problem>` for unterminated
 *   strings or text fields, a tag without a value, a loop whose value count is not a
 *   multiple of its tags, a tag given twice in one block, data before any `data_`
 *   header, and the reserved words save_, global_, stop_.
 */
export function parseCif(text: string, sourceName: string): CifDocument {
  const fail = (line: number, message: string): never => {
    throw new PhaseInputError(sourceName, `CIF "${sourceName}", line ${line}: ${message}`, line);
  };
  const tokens = tokenize(text, fail);
  const blocks: CifBlock[] = [];
  let block: CifBlock | undefined;
  const seen = new Map<string, number>();
  const claim = (tag: string, line: number): void => {
    const before = seen.get(tag);
    if (before !== undefined) fail(line, `${tag} appears twice in data_${block!.displayName} (first at line ${before}); keep one`);
    seen.set(tag, line);
  };
  const needBlock = (t: Token): CifBlock => {
    if (!block) fail(t.line, `"${t.text}" appears before any data_ block header; start the file with data_<name>`);
    return block!;
  };

  let k = 0;
  while (k < tokens.length) {
    const t = tokens[k]!;
    switch (t.kind) {
      case 'data': {
        if (t.text === '') fail(t.line, 'data_ needs a block name (e.g. data_NaCl)');
        const name = t.text.toLowerCase();
        const dup = blocks.find((b) => b.name === name);
        if (dup) fail(t.line, `block data_${t.text} appears twice (first at line ${dup.line}); give each block its own name`);
        block = { name, displayName: t.text, line: t.line, items: new Map(), loops: [] };
        blocks.push(block);
        seen.clear();
        k++;
        break;
      }
      case 'reserved':
        fail(
          t.line,
          t.text.toLowerCase().startsWith('save_')
            ? `save frames (${t.text}) belong to CIF dictionaries, not data files; remove the frame`
            : `"${t.text}" is a reserved word of CIF 1.1 and cannot be used in a data file`,
        );
        break;
      case 'value':
        needBlock(t);
        fail(t.line, `value "${t.text.slice(0, 40)}" has no tag before it; each value follows its _tag or belongs to a loop_`);
        break;
      case 'tag': {
        const b = needBlock(t);
        const next = tokens[k + 1];
        if (!next || next.kind !== 'value') fail(t.line, `${t.text} has no value; give one, or ? when it is unknown`);
        claim(t.text, t.line);
        b.items.set(t.text, next!.value!);
        k += 2;
        break;
      }
      case 'loop': {
        const b = needBlock(t);
        const tags: string[] = [];
        k++;
        while (k < tokens.length && tokens[k]!.kind === 'tag') {
          claim(tokens[k]!.text, tokens[k]!.line);
          tags.push(tokens[k]!.text);
          k++;
        }
        if (tags.length === 0) fail(t.line, 'loop_ is not followed by any _tag');
        const values: CifValue[] = [];
        while (k < tokens.length && tokens[k]!.kind === 'value') {
          values.push(tokens[k]!.value!);
          k++;
        }
        if (values.length === 0) fail(t.line, `loop_ of ${tags[0]} has no values`);
        if (values.length % tags.length !== 0) {
          fail(
            t.line,
            `loop_ of ${tags[0]} has ${values.length} values, not a multiple of its ${tags.length} tags ` +
              `(${tags.join(' ')}); a row is short or a value with spaces lacks quotes`,
          );
        }
        const rows: CifValue[][] = [];
        for (let r = 0; r < values.length; r += tags.length) rows.push(values.slice(r, r + tags.length));
        b.loops.push({ tags, rows, line: t.line });
        break;
      }
    }
  }
  return { blocks };
}

/** A number read from CIF, with its standard uncertainty when one was written in parentheses. */
export interface CifNumber {
  value: number;
  /** Standard uncertainty in the unit of `value` (4.0782(3) gives 0.0003); absent when none was written. */
  su?: number;
}

const NUMBER = /^([+-]?(?:\d+\.?\d*|\.\d+))(?:[eE]([+-]?\d+))?(?:\((\d+)\))?$/;

/**
 * Reads a CIF numeric value: `4.0782`, `-0.25`, `1.2e-3`, `4.0782(3)`,
 * `1.23e-4(4)`. The su in parentheses follows the whole number (exponent
 * included) and counts in units of the mantissa's last digit, so 4.0782(3)
 * means 4.0782 +- 0.0003 and 1.23e-4(4) means (1.23 +- 0.04) x 10^-4 (CIF 1.1
 * syntax specification, numeric values). `1.23(4)e-4` is not CIF and is refused.
 *
 * @returns the value and su, or undefined when the text is not a CIF number
 *   ('?', '.', words, empty text)
 */
export function parseCifNumber(text: string): CifNumber | undefined {
  const m = NUMBER.exec(text.trim());
  if (!m) return undefined;
  const mantissa = m[1]!;
  const exponent = m[2] === undefined ? 0 : Number(m[2]);
  const value = Number(mantissa) * 10 ** exponent;
  if (!Number.isFinite(value)) return undefined;
  if (m[3] === undefined) return { value };
  const dot = mantissa.indexOf('.');
  const decimals = dot < 0 ? 0 : mantissa.length - dot - 1;
  const scale = exponent - decimals;
  // Dividing by an exact power of ten keeps 4.0782(3) at 0.0003, not 0.00029999...
  return { value, su: scale < 0 ? Number(m[3]) / 10 ** -scale : Number(m[3]) * 10 ** scale };
}

/** The loop of `block` that has `tag` as a column, if any. Tags are compared lower-cased. */
export function cifLoopWith(block: CifBlock, tag: string): CifLoop | undefined {
  const t = tag.toLowerCase();
  return block.loops.find((l) => l.tags.includes(t));
}

/**
 * The single value of `tag` in `block`: a plain item, or the only row of a
 * one-row loop. Undefined when the tag is absent or looped over several rows
 * (it then has no single value). Never throws.
 */
export function cifItem(block: CifBlock, tag: string): CifValue | undefined {
  const t = tag.toLowerCase();
  const item = block.items.get(t);
  if (item) return item;
  const loop = cifLoopWith(block, t);
  if (loop && loop.rows.length === 1) return loop.rows[0]![loop.tags.indexOf(t)];
  return undefined;
}
