/**
 * What every fuzzed answer must satisfy, and the sizes of the fuzz runs.
 *
 * Sizes: `npm test` runs a seeded sample; `npm run fuzz` (test/fuzz/run.ts) runs the full counts
 * of the issue — 10,000 documents, 2,000 uploads — with the same seed unless one is given.
 */
import { canonicalJson, sha256Hex } from '@shared/engine/hash';
import { parseWorksheet } from '@shared/format/worksheet';

export const fuzzSeed = Number(process.env.SPREADPROOF_FUZZ_SEED ?? 20_251_201);
export const documentRuns = Number(process.env.SPREADPROOF_FUZZ_DOCUMENTS ?? 250);
export const uploadRuns = Number(process.env.SPREADPROOF_FUZZ_UPLOADS ?? 150);
export const hostileRuns = Number(process.env.SPREADPROOF_FUZZ_HOSTILE ?? 150);

const genericMessages = [/^Something went wrong/, /^Internal/i, /^undefined$/, /^\[object Object\]$/];

interface ErrorBody {
  error?: { code?: unknown; message?: unknown; details?: unknown };
}

/**
 * A refusal must be a 4xx with a known code and a message that says what is wrong (and, for a
 * validation failure, which fields). Returns the problems found (empty: fine).
 */
export function checkRefusal(status: number, body: unknown, allowedCodes: readonly string[]): string[] {
  const problems: string[] = [];
  if (status >= 500) problems.push(`status ${status}`);
  if (status < 400 || status >= 500) return problems;
  const error = (body as ErrorBody)?.error;
  if (!error || typeof error.code !== 'string') return [...problems, 'no error code'];
  if (!allowedCodes.includes(error.code)) problems.push(`unexpected code ${error.code}`);
  const message = error.message;
  if (typeof message !== 'string' || message.trim().length < 10) problems.push(`message too short: ${JSON.stringify(message)}`);
  else if (genericMessages.some((g) => g.test(message))) problems.push(`generic message: ${message}`);
  if (error.code === 'validation') {
    const details = error.details as { field?: unknown; message?: unknown }[] | undefined;
    if (!Array.isArray(details) || details.length === 0) problems.push('validation without details');
    else {
      for (const d of details) {
        if (typeof d.field !== 'string' || d.field === '' || typeof d.message !== 'string' || d.message === '') problems.push(`bad detail ${JSON.stringify(d)}`);
      }
      if (typeof message === 'string' && !details.some((d) => typeof d.field === 'string' && message.includes(d.field))) {
        problems.push(`the message names none of the fields: ${message}`);
      }
    }
  }
  if (error.code === 'too_many_steps' && typeof message === 'string' && !/steps?/.test(message)) problems.push(`too_many_steps message: ${message}`);
  if (error.code === 'unknown_dataset' && !JSON.stringify(error.details ?? '').includes('datasetId')) problems.push('unknown_dataset names no datasetId field');
  return problems;
}

interface Outcome {
  results?: { steps?: { stepId?: unknown; error?: { code?: unknown; message?: unknown } | null }[] };
  contentHash?: unknown;
  resultsHash?: unknown;
}

/**
 * An accepted document: the answer's hashes are the SHA-256 of the canonical JSON of the validated
 * document and of the results it carries; one result per step, in order; every step error named.
 */
export function checkAccepted(sent: unknown, outcome: Outcome): string[] {
  const problems: string[] = [];
  const parsed = parseWorksheet(sent);
  if (!parsed.ok) return [`accepted a document the schema refuses: ${parsed.issues[0]?.field} ${parsed.issues[0]?.message}`];
  if (outcome.contentHash !== sha256Hex(canonicalJson(parsed.worksheet))) problems.push('content hash is not that of the canonical document');
  if (!outcome.results || outcome.resultsHash !== sha256Hex(canonicalJson(outcome.results))) problems.push('results hash is not that of the results');
  const steps = outcome.results?.steps ?? [];
  if (steps.length !== parsed.worksheet.steps.length) problems.push(`${steps.length} results for ${parsed.worksheet.steps.length} steps`);
  steps.forEach((s, i) => {
    if (s.stepId !== parsed.worksheet.steps[i]?.id) problems.push(`result ${i} is for step ${String(s.stepId)}`);
    if (s.error && (typeof s.error.code !== 'string' || typeof s.error.message !== 'string' || s.error.message.length < 5)) {
      problems.push(`step ${i} error without a message: ${JSON.stringify(s.error)}`);
    }
  });
  return problems;
}

/** Runs `task` over `items` with at most `lanes` at a time; lane i takes items i, i+lanes, … in order. */
export async function inLanes<T>(items: T[], lanes: number, task: (item: T, lane: number, index: number) => Promise<void>): Promise<void> {
  await Promise.all(
    Array.from({ length: lanes }, async (_, lane) => {
      for (let i = lane; i < items.length; i += lanes) await task(items[i], lane, i);
    }),
  );
}
