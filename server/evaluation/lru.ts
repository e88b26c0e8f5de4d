// A small least-recently-used map bounded by the total size of its values. Only ever a cache:
// everything in it can be recomputed or reloaded, so several server processes may each keep one.
export class SizedLru<K, V> {
  private readonly map = new Map<K, { value: V; size: number }>();
  private total = 0;

  constructor(
    private readonly maxSize: number,
    private readonly sizeOf: (value: V) => number,
  ) {}

  get(key: K): V | undefined {
    const entry = this.map.get(key);
    if (!entry) return undefined;
    // Re-insert to mark as most recently used (Map keeps insertion order).
    this.map.delete(key);
    this.map.set(key, entry);
    return entry.value;
  }

  set(key: K, value: V): void {
    const size = this.sizeOf(value);
    if (size > this.maxSize) return;
    const old = this.map.get(key);
    if (old) {
      this.total -= old.size;
      this.map.delete(key);
    }
    this.map.set(key, { value, size });
    this.total += size;
    for (const [k, entry] of this.map) {
      if (this.total <= this.maxSize) break;
      this.map.delete(k);
      this.total -= entry.size;
    }
  }

  get size(): number {
    return this.map.size;
  }

  get bytes(): number {
    return this.total;
  }
}
