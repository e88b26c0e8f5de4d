/**
 * JSON answers that carry stored JSON text as it is. A revision's document and results are kept
 * as canonical JSON text (the text their hashes were taken of, often 100 kB or more); parsing it
 * only to serialise it again costs the main thread several milliseconds per answer. Wrap such
 * text in RawJson and send the answer with sendJson: the text is spliced in unchanged.
 */
import { randomBytes } from 'node:crypto';
import type { Response } from 'express';

/** Set while stringifyWithRaw runs (synchronously): where RawJson parts go instead of being parsed. */
let splicing: { mark: string; raws: string[] } | null = null;

export class RawJson {
  /** `text` must be valid JSON (it is spliced into the answer unchecked). */
  constructor(readonly text: string) {}

  /**
   * Inside stringifyWithRaw, a placeholder for the text; anywhere else (a plain res.json), the
   * parsed value, so that an answer sent the ordinary way is still right, only slower.
   */
  toJSON(): unknown {
    if (!splicing) return JSON.parse(this.text);
    splicing.raws.push(this.text);
    return `${splicing.mark}:${splicing.raws.length - 1}`;
  }
}

/**
 * JSON.stringify of `value` with every RawJson replaced by its text. Each RawJson is first
 * written as a placeholder string with a random 128-bit mark, which no other string of the value
 * can equal by chance, and then swapped for its text.
 */
export function stringifyWithRaw(value: unknown): string {
  const state = { mark: randomBytes(16).toString('hex'), raws: [] as string[] };
  let text: string;
  splicing = state;
  try {
    text = JSON.stringify(value);
  } finally {
    splicing = null;
  }
  if (state.raws.length === 0) return text;
  return text.replace(new RegExp(`"${state.mark}:(\\d+)"`, 'g'), (_m, index: string) => state.raws[Number(index)]);
}

/** Sends `value` as a JSON answer (RawJson parts spliced in) with `status`. */
export function sendJson(res: Response, status: number, value: unknown): void {
  res.status(status).type('application/json; charset=utf-8').send(stringifyWithRaw(value));
}
