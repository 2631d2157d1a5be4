/**
 * A header: ordered cards with typed access, serialised to 2880-byte blocks ending in END
 * (FITS Standard 4.0 §3.3, §4.4.1).
 */
import { CARD_BYTES, COMMENTARY_KEYWORDS, END_CARD, formatCard, parseCard, type Card, type CardValue } from './card.ts';
import { fitsFail, type FitsContext } from './errors.ts';

/** FITS logical record length (FITS 4.0 §3.1). */
export const BLOCK_BYTES = 2880;
const CARDS_PER_BLOCK = BLOCK_BYTES / CARD_BYTES;
/** Text width of a COMMENT/HISTORY card, columns 9-80. */
const COMMENTARY_WIDTH = CARD_BYTES - 8;

export function paddedLength(n: number): number {
  return Math.ceil(n / BLOCK_BYTES) * BLOCK_BYTES;
}

/** A card for writing: value cards, or COMMENT/HISTORY with the text in `comment`. */
export interface CardInput {
  keyword: string;
  value?: CardValue | null;
  comment?: string;
}

export class FitsHeader {
  /** Cards in file order, END excluded. */
  readonly cards: Card[] = [];
  /** Where this header sits, for error messages. */
  ctx: FitsContext;
  /** Byte offset of the header in its file (0 for headers being built). */
  byteOffset = 0;
  private writeValues = new Map<number, CardValue | null>();

  constructor(ctx: FitsContext = {}) {
    this.ctx = ctx;
  }

  /** Index of the first value card with this keyword, or -1. */
  indexOf(keyword: string): number {
    return this.cards.findIndex((c) => !c.commentary && c.keyword === keyword);
  }

  has(keyword: string): boolean {
    return this.indexOf(keyword) >= 0;
  }

  /** Raw value (undefined when absent, null when the card has no value). */
  get(keyword: string): Card['value'] | undefined {
    const i = this.indexOf(keyword);
    return i < 0 ? undefined : this.cards[i].value;
  }

  /** 1-based card number of a keyword, for messages. */
  cardNumber(keyword: string): number | undefined {
    const i = this.indexOf(keyword);
    return i < 0 ? undefined : i + 1;
  }

  private bad(keyword: string, expected: string): never {
    return fitsFail(this.ctx, `keyword ${keyword} has the wrong type`, {
      card: this.cardNumber(keyword),
      keyword,
      value: this.get(keyword),
      byteOffset: this.byteOffset + (this.indexOf(keyword) * CARD_BYTES),
      expected,
    });
  }

  getString(keyword: string): string | undefined {
    const v = this.get(keyword);
    if (v === undefined) return undefined;
    if (typeof v !== 'string') this.bad(keyword, 'a quoted string');
    return v;
  }

  getNumber(keyword: string): number | undefined {
    const v = this.get(keyword);
    if (v === undefined) return undefined;
    if (typeof v === 'bigint') return Number(v);
    if (typeof v !== 'number') this.bad(keyword, 'a number');
    return v;
  }

  getInt(keyword: string): number | undefined {
    const v = this.get(keyword);
    if (v === undefined) return undefined;
    if (typeof v !== 'number' || !Number.isInteger(v)) this.bad(keyword, 'an integer');
    return v;
  }

  getBool(keyword: string): boolean | undefined {
    const v = this.get(keyword);
    if (v === undefined) return undefined;
    if (typeof v !== 'boolean') this.bad(keyword, 'T or F');
    return v;
  }

  requireInt(keyword: string, expected = 'an integer'): number {
    const v = this.getInt(keyword);
    if (v === undefined) fitsFail(this.ctx, `missing mandatory keyword ${keyword}`, { keyword, expected });
    return v;
  }

  /** Text of all COMMENT or HISTORY cards. */
  commentary(keyword: 'COMMENT' | 'HISTORY'): string[] {
    return this.cards.filter((c) => c.commentary && c.keyword === keyword).map((c) => c.comment);
  }

  /** Sets a value: replaces the first card with this keyword, or appends. */
  set(keyword: string, value: CardValue | null, comment?: string): this {
    // Format now so a bad value fails here, at the caller, not at serialisation.
    formatCard(keyword, value, comment ?? '', this.ctx);
    const i = this.indexOf(keyword);
    const plain = plainValue(value);
    if (i >= 0) {
      const old = this.cards[i];
      this.cards[i] = { keyword, value: plain, comment: comment ?? old.comment, commentary: false };
      this.writeValues.set(i, value);
    } else {
      this.cards.push({ keyword, value: plain, comment: comment ?? '', commentary: false });
      this.writeValues.set(this.cards.length - 1, value);
    }
    return this;
  }

  /** Appends COMMENT or HISTORY text, split over as many cards as needed. */
  addCommentary(keyword: 'COMMENT' | 'HISTORY' | '', text: string): this {
    const chunks = text.length === 0 ? [''] : [];
    for (let i = 0; i < text.length; i += COMMENTARY_WIDTH) chunks.push(text.slice(i, i + COMMENTARY_WIDTH));
    for (const t of chunks) {
      formatCard(keyword, null, t, this.ctx);
      this.cards.push({ keyword, value: null, comment: t, commentary: true });
    }
    return this;
  }

  add(input: CardInput): this {
    if (COMMENTARY_KEYWORDS.has(input.keyword)) {
      // COMMENT, HISTORY and blank-keyword cards hold text in columns 9–80 and no value (FITS 4.0
      // §4.4.2.4): a value given here would be written as text or dropped, so it is refused.
      if (input.value !== undefined && input.value !== null)
        fitsFail(this.ctx, 'commentary card given a value', { keyword: input.keyword, value: input.value as string | number | boolean, expected: 'text in comment, no value (FITS 4.0 §4.4.2.4)' });
      return this.addCommentary(input.keyword as 'COMMENT', input.comment ?? '');
    }
    return this.set(input.keyword, input.value ?? null, input.comment);
  }

  /** The header as 80-character card images, END included, space-padded to whole blocks. */
  toBytes(): Uint8Array {
    const nCards = this.cards.length + 1;
    const out = new Uint8Array(paddedLength(nCards * CARD_BYTES)).fill(0x20);
    this.cards.forEach((c, i) => {
      const v = this.writeValues.has(i) ? this.writeValues.get(i)! : c.value;
      const text = c.commentary ? formatCard(c.keyword, null, c.comment, this.ctx) : formatCard(c.keyword, v ?? null, c.comment, this.ctx);
      writeAscii(out, i * CARD_BYTES, text);
    });
    writeAscii(out, this.cards.length * CARD_BYTES, END_CARD);
    return out;
  }

  /**
   * Parses a header starting at `offset`: reads whole blocks until the END card.
   * Returns the header and its length in bytes (a multiple of 2880).
   */
  static parse(bytes: Uint8Array, offset: number, ctx: FitsContext): { header: FitsHeader; byteLength: number } {
    const header = new FitsHeader(ctx);
    header.byteOffset = offset;
    let pos = offset;
    let cardNo = 0;
    for (;;) {
      if (pos + BLOCK_BYTES > bytes.length) {
        const why = pos >= bytes.length ? 'file ends before the END card' : `file ends inside a header block (${bytes.length - pos} of ${BLOCK_BYTES} bytes)`;
        fitsFail(ctx, `missing END card: ${why}`, {
          byteOffset: pos,
          expected: `a header of whole ${BLOCK_BYTES}-byte blocks closed by END, starting at byte ${offset}`,
        });
      }
      for (let k = 0; k < CARDS_PER_BLOCK; k++) {
        cardNo++;
        const at = pos + k * CARD_BYTES;
        const card = parseCard(readAscii(bytes, at, CARD_BYTES), ctx, cardNo, at);
        if (card.keyword === 'END' && !card.commentary) {
          // Cards after END in the same block must be blank (FITS 4.0 §4.4.1).
          for (let j = k + 1; j < CARDS_PER_BLOCK; j++) {
            const rest = readAscii(bytes, pos + j * CARD_BYTES, CARD_BYTES);
            if (rest.trim() !== '') {
              fitsFail(ctx, 'text after the END card', { card: cardNo + j - k, byteOffset: pos + j * CARD_BYTES, expected: 'blank (space) cards after END' });
            }
          }
          header.ctx = { ...ctx, hduName: header.getString('EXTNAME') ?? ctx.hduName };
          return { header, byteLength: pos + BLOCK_BYTES - offset };
        }
        header.cards.push(card);
      }
      pos += BLOCK_BYTES;
    }
  }
}

function plainValue(v: CardValue | null): Card['value'] {
  if (v === null || typeof v !== 'object') return v;
  return v.value;
}

function writeAscii(out: Uint8Array, at: number, s: string): void {
  for (let i = 0; i < s.length; i++) out[at + i] = s.charCodeAt(i);
}

export function readAscii(bytes: Uint8Array, at: number, n: number): string {
  let s = '';
  for (let i = 0; i < n; i++) s += String.fromCharCode(bytes[at + i]);
  return s;
}
