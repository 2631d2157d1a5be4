/**
 * One 80-character header card (FITS Standard 4.0, §4.1-4.2): format and strict parse.
 * Only fixed-format values are written; free-format values are accepted on reading.
 */
import { fitsFail, type FitsContext } from './errors.ts';

/** Card length in bytes (FITS 4.0 §3.3.1). */
export const CARD_BYTES = 80;
/** Width of the keyword field, columns 1-8 (FITS 4.0 §4.1.2.1). */
export const KEYWORD_WIDTH = 8;
/** Fixed-format numbers and logicals end in column 30 (FITS 4.0 §4.2.2-4.2.4). */
const FIXED_VALUE_END_COL = 30;
/** A fixed-format string's closing quote sits at column 20 or later: at least 8 characters (FITS 4.0 §4.2.1.1). */
const MIN_STRING_CHARS = 8;
/** Longest string value on one card: columns 11-80 minus the two quotes. */
export const MAX_STRING_CHARS = CARD_BYTES - 10 - 2;
/** Keywords whose cards carry free text in columns 9-80 (FITS 4.0 §4.4.2.4). */
export const COMMENTARY_KEYWORDS = new Set(['COMMENT', 'HISTORY', '']);

/** A real-valued keyword that must be written with a decimal point even when integral. */
export interface RealValue {
  readonly kind: 'real';
  readonly value: number;
}
export const real = (value: number): RealValue => ({ kind: 'real', value });

export type CardValue = string | boolean | number | bigint | RealValue;

export interface Card {
  keyword: string;
  /** null for a value card with an undefined value, or for commentary cards. */
  value: string | boolean | number | bigint | null;
  /** Comment after " / ", or the text of a commentary card. */
  comment: string;
  /** True for COMMENT, HISTORY, blank keyword and keywords without "= ". */
  commentary: boolean;
  /** True when the parsed number had no decimal point or exponent. */
  integer?: boolean;
}

const KEYWORD_RE = /^[A-Z0-9_-]*$/;
const INT_RE = /^[+-]?[0-9]+$/;
const REAL_RE = /^[+-]?([0-9]+\.?[0-9]*|\.[0-9]+)([EeDd][+-]?[0-9]+)?$/;

function isPrintable(s: string): boolean {
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    if (c < 0x20 || c > 0x7e) return false;
  }
  return true;
}

export function checkKeyword(keyword: string, ctx?: FitsContext): void {
  if (keyword.length > KEYWORD_WIDTH || !KEYWORD_RE.test(keyword)) {
    fitsFail(ctx, 'invalid keyword', { keyword, value: keyword, expected: 'at most 8 characters from A-Z 0-9 _ -' });
  }
}

/** Shortest exact decimal form with a decimal point and an upper-case exponent. */
export function formatReal(x: number, ctx?: FitsContext, keyword?: string): string {
  if (!Number.isFinite(x)) fitsFail(ctx, 'header values must be finite numbers', { keyword, value: x, expected: 'a finite number' });
  const s = String(x);
  const e = s.indexOf('e');
  let mant = e >= 0 ? s.slice(0, e) : s;
  const exp = e >= 0 ? s.slice(e + 1) : '';
  if (!mant.includes('.')) mant += '.0';
  return exp ? `${mant}E${exp}` : mant;
}

function formatValueField(keyword: string, value: CardValue, ctx?: FitsContext): string {
  if (typeof value === 'string') {
    if (!isPrintable(value)) fitsFail(ctx, 'string value has non-printable characters', { keyword, value, expected: 'ASCII 0x20-0x7E' });
    const body = value.replace(/'/g, "''").padEnd(MIN_STRING_CHARS, ' ');
    if (body.length > MAX_STRING_CHARS) {
      fitsFail(ctx, 'string value too long for one card', { keyword, value, expected: `at most ${MAX_STRING_CHARS} characters (quotes doubled)` });
    }
    // Pad the value field to column 30 like numbers, so comments line up (common practice, no source).
    return `'${body}'`.padEnd(FIXED_VALUE_END_COL - 10, ' ');
  }
  let text: string;
  if (typeof value === 'boolean') text = value ? 'T' : 'F';
  else if (typeof value === 'bigint') text = value.toString();
  else if (typeof value === 'number') {
    text = Number.isInteger(value) ? String(value) : formatReal(value, ctx, keyword);
    if (Number.isInteger(value) && !Number.isSafeInteger(value)) text = formatReal(value, ctx, keyword);
  } else text = formatReal(value.value, ctx, keyword);
  return text.padStart(FIXED_VALUE_END_COL - 10, ' ');
}

/** Formats a value card or a commentary card into exactly 80 characters. Long comments are cut. */
export function formatCard(keyword: string, value: CardValue | null, comment = '', ctx?: FitsContext): string {
  checkKeyword(keyword, ctx);
  if (!isPrintable(comment)) fitsFail(ctx, 'comment has non-printable characters', { keyword, value: comment, expected: 'ASCII 0x20-0x7E' });
  const key = keyword.padEnd(KEYWORD_WIDTH, ' ');
  if (COMMENTARY_KEYWORDS.has(keyword)) {
    if (comment.length > CARD_BYTES - KEYWORD_WIDTH) {
      fitsFail(ctx, 'commentary text too long for one card', { keyword, value: comment, expected: `at most ${CARD_BYTES - KEYWORD_WIDTH} characters` });
    }
    return (key + comment).padEnd(CARD_BYTES, ' ');
  }
  const field = value === null ? ''.padEnd(FIXED_VALUE_END_COL - 10) : formatValueField(keyword, value, ctx);
  let card = `${key}= ${field}`;
  if (comment) card += ` / ${comment}`;
  return card.length > CARD_BYTES ? card.slice(0, CARD_BYTES) : card.padEnd(CARD_BYTES, ' ');
}

export const END_CARD = 'END'.padEnd(CARD_BYTES, ' ');

/** Parses the text after a value's end: blanks, or " / comment". */
function parseComment(rest: string, ctx: FitsContext | undefined, card: number, keyword: string, byteOffset?: number): string {
  const t = rest.trimStart();
  if (t === '') return '';
  if (t[0] !== '/') fitsFail(ctx, 'unexpected text after the value', { card, byteOffset, keyword, value: t.trimEnd(), expected: "blanks or '/ comment'" });
  return t.slice(1).trim();
}

/**
 * Parses one card. `card` is the 1-based card number for messages. Throws on bad syntax:
 * non-ASCII bytes, lower-case or embedded-space keywords, unterminated strings, malformed numbers.
 */
export function parseCard(text: string, ctx?: FitsContext, card = 0, byteOffset?: number): Card {
  if (text.length !== CARD_BYTES) fitsFail(ctx, 'card is not 80 characters', { card, byteOffset, expected: '80 characters' });
  if (!isPrintable(text)) {
    let i = 0;
    while (i < text.length && text.charCodeAt(i) >= 0x20 && text.charCodeAt(i) <= 0x7e) i++;
    fitsFail(ctx, `header card has a non-ASCII byte 0x${text.charCodeAt(i).toString(16).padStart(2, '0')} in column ${i + 1}`, {
      card,
      byteOffset,
      expected: 'printable ASCII 0x20-0x7E (FITS 4.0 §4.1.1)',
    });
  }
  const rawKey = text.slice(0, KEYWORD_WIDTH);
  const keyword = rawKey.trimEnd();
  if (!KEYWORD_RE.test(keyword) || rawKey.trimStart().length !== rawKey.length && keyword !== '') {
    fitsFail(ctx, 'bad keyword syntax', { card, byteOffset, value: rawKey, expected: 'keyword of A-Z 0-9 _ - left-justified in columns 1-8' });
  }
  if (keyword === 'END') {
    if (text.slice(3).trim() !== '') fitsFail(ctx, 'END card has text after the keyword', { card, byteOffset, expected: 'columns 4-80 blank' });
    return { keyword, value: null, comment: '', commentary: false };
  }
  if (COMMENTARY_KEYWORDS.has(keyword) || text.slice(8, 10) !== '= ') {
    return { keyword, value: null, comment: text.slice(KEYWORD_WIDTH).trimEnd(), commentary: true };
  }
  const field = text.slice(10);
  const lead = field.length - field.trimStart().length;
  const body = field.slice(lead);
  if (body.startsWith("'")) {
    let s = '';
    let i = 1;
    for (;;) {
      if (i >= body.length) fitsFail(ctx, 'string value has no closing quote', { card, byteOffset, keyword, expected: "a string closed by a single quote (embedded quotes doubled)" });
      const ch = body[i];
      if (ch === "'") {
        if (body[i + 1] === "'") {
          s += "'";
          i += 2;
          continue;
        }
        break;
      }
      s += ch;
      i++;
    }
    // Trailing blanks in strings are not significant (FITS 4.0 §4.2.1.1).
    return { keyword, value: s.trimEnd(), comment: parseComment(body.slice(i + 1), ctx, card, keyword, byteOffset), commentary: false };
  }
  const slash = body.indexOf('/');
  const token = (slash >= 0 ? body.slice(0, slash) : body).trim();
  const comment = slash >= 0 ? body.slice(slash + 1).trim() : '';
  if (token === '') return { keyword, value: null, comment, commentary: false };
  if (token === 'T' || token === 'F') return { keyword, value: token === 'T', comment, commentary: false };
  if (INT_RE.test(token)) {
    const big = BigInt(token);
    const value = big <= BigInt(Number.MAX_SAFE_INTEGER) && big >= BigInt(Number.MIN_SAFE_INTEGER) ? Number(big) : big;
    return { keyword, value, comment, commentary: false, integer: true };
  }
  if (REAL_RE.test(token)) {
    return { keyword, value: Number(token.replace(/[Dd]/, 'E')), comment, commentary: false, integer: false };
  }
  return fitsFail(ctx, 'bad value syntax', {
    card,
    byteOffset,
    keyword,
    value: token,
    expected: "a quoted string, T or F, an integer or a real number (FITS 4.0 §4.2)",
  });
}
