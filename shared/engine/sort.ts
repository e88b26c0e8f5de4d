// Sorting of float data for the order statistics of the engine (median, quartiles,
// Anderson-Darling, Shapiro-Wilk, probability plots).
//
// Every method that needs sorted data should call `sortFloat64` instead of
// `Float64Array.prototype.sort`: on a million values it is several times faster, and the engine's
// benchmark (`npm run bench:engine`) measures the methods against a floor that contains one
// built-in sort. Sort a column once and share the sorted copy between the methods that need it.

/** Segments up to this length are finished by insertion sort. */
const LEAF = 48;
/** Below this length the built-in typed-array sort is faster than the radix setup. */
const SMALL = 2048;

/** Width of the first digit for large arrays. */
const TOP_BITS = 16;
/** From this length on, the first digit is the fixed top 16 bits, counted in the first pass. */
const LARGE = 1 << 18;

const LITTLE_ENDIAN = new Uint8Array(new Uint32Array([1]).buffer)[0] === 1;

/**
 * Returns an ascending sorted copy of `values`; the input is not modified.
 *
 * Order is that of `Float64Array.prototype.sort`: -Infinity < negatives < -0 < +0 < positives
 * < +Infinity, subnormals in place. NaN is not allowed (a RangeError names its index): the engine
 * treats non-numeric cells as missing before any method sees the data.
 *
 * Method: radix sort on the IEEE-754 bit patterns (Knuth, TAOCP vol. 3, 5.2.5). Setting the sign
 * bit of a non-negative double and inverting all bits of a negative one maps doubles to unsigned
 * 64-bit keys in the same order (M. Herf, "Radix tricks", 2001). The keys are never stored; the
 * digits are read from the original bits. The sort is most-significant-digit first: one pass on
 * the top 16 bits (sign, exponent, 4 fraction bits) splits the data by magnitude; when one
 * bucket would hold most of the data (readings of one sign and exponent), the split is taken
 * instead on the 16 bits below the highest bit on which the values differ. Each bucket is then
 * split on the next 6 to 11 bits (fewer for small buckets) until it holds at most `LEAF`
 * values, which insertion sort finishes. Every bucket after the first digit holds values of one sign, so -0 and +0 never
 * meet in a comparison. A digit on which all values of a bucket
 * agree costs a counting pass but no move, and a bucket of equal values stops at once, so ties
 * and narrow ranges (quantised gauge readings) stay cheap. Real data need two or three passes
 * where a least-significant-digit sort needs six; the worst case (values differing only in the
 * last fraction bits) is O(64/6 · n). Memory: the result plus one scratch buffer (and its 16-bit
 * digits) as large as the largest first-digit bucket, which for real data is a small fraction of
 * n. Deterministic.
 */
export function sortFloat64(values: Float64Array): Float64Array {
  const n = values.length;
  const out = new Float64Array(n);
  if (n < SMALL || !LITTLE_ENDIAN) {
    for (let i = 0; i < n; i++) {
      const x = values[i];
      if (x !== x) throw nanError(i);
      out[i] = x;
    }
    return out.sort();
  }

  const words = new Uint32Array(values.buffer, values.byteOffset, n * 2);
  let low: number;
  let width: number;
  let offsets: Uint32Array;
  let largest: number;
  const firstFlip = words[1] >> 31;
  const firstHi = (words[1] ^ (firstFlip | 0x80000000)) >>> 0;
  const firstLo = (words[0] ^ firstFlip) >>> 0;
  let diffHi = 0;
  let diffLo = 0;
  if (n >= LARGE) {
    // Pass 1: refuse NaN, count the first digit (the top 16 key bits: sign, exponent, 4 fraction
    // bits), and note which key bits differ at all.
    offsets = new Uint32Array((1 << TOP_BITS) + 1);
    for (let i = 0; i < n; i++) {
      const hi = words[2 * i + 1];
      const lo = words[2 * i];
      // NaN: exponent all ones and a non-zero fraction.
      if ((hi & 0x7ff00000) === 0x7ff00000 && ((hi & 0x000fffff) !== 0 || lo !== 0)) throw nanError(i);
      const flip = hi >> 31;
      const keyHi = hi ^ (flip | 0x80000000);
      diffHi |= keyHi ^ firstHi;
      diffLo |= (lo ^ flip) ^ firstLo;
      offsets[(keyHi >>> 16) + 1]++;
    }
    if (diffHi === 0 && diffLo === 0) {
      out.set(values);
      return out;
    }
    low = 64 - TOP_BITS;
    width = TOP_BITS;
    largest = prefixSums(offsets);
    const top = diffHi !== 0 ? 63 - Math.clz32(diffHi) : 31 - Math.clz32(diffLo);
    if (largest * 2 > n && top < 63) {
      // One bucket holds most values (readings of one sign and magnitude, such as gauge data):
      // split instead on the 16 bits from the highest bit on which the values differ.
      low = Math.max(0, top - (TOP_BITS - 1));
      width = top - low + 1;
      offsets = new Uint32Array((1 << width) + 1);
      countDigits(words, n, low, width, offsets);
      largest = prefixSums(offsets);
    }
  } else {
    // Smaller arrays: a first digit of about log2(n) − 2 bits (fewer buckets to set up), always
    // from the highest key bit on which the values differ.
    for (let i = 0; i < n; i++) {
      const hi = words[2 * i + 1];
      const lo = words[2 * i];
      if ((hi & 0x7ff00000) === 0x7ff00000 && ((hi & 0x000fffff) !== 0 || lo !== 0)) throw nanError(i);
      const flip = hi >> 31;
      diffHi |= (hi ^ (flip | 0x80000000)) ^ firstHi;
      diffLo |= (lo ^ flip) ^ firstLo;
    }
    if (diffHi === 0 && diffLo === 0) {
      out.set(values);
      return out;
    }
    const top = diffHi !== 0 ? 63 - Math.clz32(diffHi) : 31 - Math.clz32(diffLo);
    const bits = Math.min(TOP_BITS, Math.max(6, Math.ceil(Math.log2(n)) - 2));
    low = Math.max(0, top - (bits - 1));
    width = top - low + 1;
    offsets = new Uint32Array((1 << width) + 1);
    countDigits(words, n, low, width, offsets);
    largest = prefixSums(offsets);
  }
  const buckets = 1 << width;
  // offsets[b] is now the start of bucket b; scatter with a moving cursor per bucket.
  scatterDigits(words, values, out, low, width, offsets.slice(0, buckets));

  const scratchLength = largest > LEAF ? largest : 0;
  const scratch = new Float64Array(scratchLength);
  const state: SortState = {
    out,
    scratch,
    outWords: new Uint32Array(out.buffer, out.byteOffset, n * 2),
    scratchWords: new Uint32Array(scratch.buffer, 0, scratchLength * 2),
    digits: new Uint16Array(scratchLength),
    counts: [],
    cursors: [],
    base: 0,
  };
  // With the sign bit in the first digit, buckets below the middle hold the negative values;
  // otherwise every value has the sign of the first.
  const signInDigit = low + width === 64;
  for (let b = 0; b < buckets; b++) {
    const start = offsets[b];
    const length = offsets[b + 1] - start;
    if (length < 2) continue;
    state.base = start;
    sortBucket(state, out, start, length, 64 - low, signInDigit ? b < buckets >>> 1 : firstFlip !== 0, 0);
  }
  return out;
}

/** Turns counts (at index digit + 1) into bucket starts; returns the largest count. */
function prefixSums(offsets: Uint32Array): number {
  let largest = 0;
  for (let b = 1; b < offsets.length; b++) {
    if (offsets[b] > largest) largest = offsets[b];
    offsets[b] += offsets[b - 1];
  }
  return largest;
}

// The first digit, `width` bits of the key from key bit `low` up, in three loops by where the
// digit lies, so that the hot loops carry no branch on it.

function countDigits(words: Uint32Array, n: number, low: number, width: number, offsets: Uint32Array): void {
  const mask = (1 << width) - 1;
  if (low >= 32) {
    const shift = low - 32;
    for (let i = 0; i < n; i++) {
      const hi = words[2 * i + 1];
      offsets[(((hi ^ ((hi >> 31) | 0x80000000)) >>> shift) & mask) + 1]++;
    }
  } else if (low + width <= 32) {
    for (let i = 0; i < n; i++) offsets[(((words[2 * i] ^ (words[2 * i + 1] >> 31)) >>> low) & mask) + 1]++;
  } else {
    const up = 32 - low;
    for (let i = 0; i < n; i++) {
      const hi = words[2 * i + 1];
      const flip = hi >> 31;
      offsets[((((hi ^ (flip | 0x80000000)) << up) | ((words[2 * i] ^ flip) >>> low)) & mask) + 1]++;
    }
  }
}

function scatterDigits(words: Uint32Array, values: Float64Array, out: Float64Array, low: number, width: number, cursor: Uint32Array): void {
  const n = values.length;
  const mask = (1 << width) - 1;
  if (low >= 32) {
    const shift = low - 32;
    for (let i = 0; i < n; i++) {
      const hi = words[2 * i + 1];
      out[cursor[((hi ^ ((hi >> 31) | 0x80000000)) >>> shift) & mask]++] = values[i];
    }
  } else if (low + width <= 32) {
    for (let i = 0; i < n; i++) out[cursor[((words[2 * i] ^ (words[2 * i + 1] >> 31)) >>> low) & mask]++] = values[i];
  } else {
    const up = 32 - low;
    for (let i = 0; i < n; i++) {
      const hi = words[2 * i + 1];
      const flip = hi >> 31;
      out[cursor[(((hi ^ (flip | 0x80000000)) << up) | ((words[2 * i] ^ flip) >>> low)) & mask]++] = values[i];
    }
  }
}

interface SortState {
  readonly out: Float64Array;
  /** Ping-pong space for one first-digit bucket; `base` maps its absolute position 0. */
  readonly scratch: Float64Array;
  /** The two buffers as 32-bit words, for reading digits without creating views per bucket. */
  readonly outWords: Uint32Array;
  readonly scratchWords: Uint32Array;
  /** Digits of the bucket being split, computed once for the count and the scatter. */
  readonly digits: Uint16Array;
  /** Counts and cursors per recursion depth, reused so that splitting allocates nothing. */
  readonly counts: Uint32Array[];
  readonly cursors: Uint32Array[];
  base: number;
}

const MAX_WIDTH = 11;

/**
 * Sorts the values at absolute positions [start, start + length) held in `buf` (`out` or
 * `scratch`), all of one sign, whose top `consumed` key bits are equal; the result lands in `out`.
 */
function sortBucket(
  state: SortState,
  buf: Float64Array,
  start: number,
  length: number,
  consumed: number,
  negative: boolean,
  depth: number,
): void {
  const { out, scratch, digits } = state;
  if (state.counts.length <= depth) {
    state.counts.push(new Uint32Array((1 << MAX_WIDTH) + 1));
    state.cursors.push(new Uint32Array(1 << MAX_WIDTH));
  }
  const counts = state.counts[depth];
  const cursor = state.cursors[depth];
  for (;;) {
    const bufOffset = buf === out ? start : start - state.base;
    if (length <= LEAF || consumed >= 64) {
      insertionSortInto(buf, bufOffset, out, start, length);
      return;
    }
    const width = Math.min(length > 4096 ? MAX_WIDTH : length > 512 ? 8 : 6, 64 - consumed);
    const buckets = 1 << width;
    const words = buf === out ? state.outWords : state.scratchWords;
    const allEqual = computeDigits(buf, words, bufOffset, length, 64 - consumed - width, width, negative, digits);
    if (allEqual) {
      if (buf !== out) for (let i = 0; i < length; i++) out[start + i] = buf[bufOffset + i];
      return;
    }
    consumed += width;
    counts.fill(0, 0, buckets + 1);
    for (let i = 0; i < length; i++) counts[digits[i] + 1]++;
    let single = false;
    for (let b = 1; b <= buckets; b++) {
      if (counts[b] === length) single = true;
      counts[b] += counts[b - 1];
    }
    if (single) continue; // every value has the same digit: nothing moves

    const target = buf === out ? scratch : out;
    const targetOffset = target === out ? start : start - state.base;
    for (let b = 0; b < buckets; b++) cursor[b] = counts[b];
    for (let i = 0; i < length; i++) target[targetOffset + cursor[digits[i]]++] = buf[bufOffset + i];
    for (let b = 0; b < buckets; b++) {
      const bucketLength = counts[b + 1] - counts[b];
      if (bucketLength === 0) continue;
      const bucketStart = start + counts[b];
      if (bucketLength === 1) {
        if (target !== out) out[bucketStart] = target[targetOffset + counts[b]];
      } else if (bucketLength <= LEAF) {
        insertionSortInto(target, targetOffset + counts[b], out, bucketStart, bucketLength);
      } else {
        sortBucket(state, target, bucketStart, bucketLength, consumed, negative, depth + 1);
      }
    }
    return;
  }
}

/**
 * Writes into `digits` the key digit of `width` bits whose lowest bit is key bit `low`, for each
 * of `length` values at buf[offset...] (`words` is buf as 32-bit words); returns whether all
 * those values are equal.
 */
function computeDigits(
  buf: Float64Array,
  words: Uint32Array,
  offset: number,
  length: number,
  low: number,
  width: number,
  negative: boolean,
  digits: Uint16Array,
): boolean {
  const mask = (1 << width) - 1;
  // Negative values: the key is the inverted bits.
  const flip = negative ? mask : 0;
  const w = 2 * offset;
  // Three loops so that the extraction has no branch on where the digit lies.
  if (low >= 32) {
    const shift = low - 32;
    for (let i = 0; i < length; i++) digits[i] = ((words[w + 2 * i + 1] >>> shift) & mask) ^ flip;
  } else if (low + width <= 32) {
    for (let i = 0; i < length; i++) digits[i] = ((words[w + 2 * i] >>> low) & mask) ^ flip;
  } else {
    const up = 32 - low;
    for (let i = 0; i < length; i++) digits[i] = (((words[w + 2 * i + 1] << up) | (words[w + 2 * i] >>> low)) & mask) ^ flip;
  }
  const first = buf[offset];
  for (let i = 1; i < length; i++) if (buf[offset + i] !== first) return false;
  return true;
}

/**
 * Insertion sort of `length` values from src[srcOffset...] into dst[dstStart...] (src may be dst
 * at the same place). Values of one sign only, so `>` orders them exactly (no NaN, no ±0 pair).
 */
function insertionSortInto(src: Float64Array, srcOffset: number, dst: Float64Array, dstStart: number, length: number): void {
  for (let i = 0; i < length; i++) {
    const x = src[srcOffset + i];
    let j = dstStart + i - 1;
    while (j >= dstStart && dst[j] > x) {
      dst[j + 1] = dst[j];
      j--;
    }
    dst[j + 1] = x;
  }
}

function nanError(index: number): RangeError {
  return new RangeError(`sortFloat64: NaN at index ${index}; missing values must be removed before sorting`);
}
