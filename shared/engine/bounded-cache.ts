/**
 * The engine's one kind of cache: at most `limit` entries, so untrusted input can never grow it
 * without bound, and entries in use stay. Entries live in a young and an old Map of at most half
 * the limit each. New entries go into the young one; when it is full, it becomes the old one and
 * what the old one still held is dropped. Reading an old entry moves it back into the young Map,
 * so an entry read at least once between two turn-overs is never dropped. A hit on a young entry
 * is one Map look-up (a strict LRU, which moves an entry on every hit, was the most expensive step
 * of a cached channel evaluation).
 *
 * Values put in it must be immutable (frozen, or strings and numbers) or never leave the module
 * that owns the cache, because every caller shares them.
 */
export class BoundedCache<K, V> {
  private young = new Map<K, V>()
  private old = new Map<K, V>()
  private readonly half: number

  constructor(readonly limit: number) {
    this.half = Math.max(1, Math.ceil(limit / 2))
  }

  get(key: K): V | undefined {
    const value = this.young.get(key)
    if (value !== undefined || this.old.size === 0) return value
    const aged = this.old.get(key)
    if (aged !== undefined) {
      this.old.delete(key)
      this.put(key, aged)
    }
    return aged
  }

  set(key: K, value: V): V {
    if (this.young.has(key)) this.young.set(key, value)
    else {
      this.old.delete(key)
      this.put(key, value)
    }
    return value
  }

  /** The value under `key`, made by `make` (and kept) when there is none. */
  getOrSet(key: K, make: () => V): V {
    const hit = this.get(key)
    return hit !== undefined ? hit : this.set(key, make())
  }

  get size(): number {
    return this.young.size + this.old.size
  }

  clear(): void {
    this.young.clear()
    this.old.clear()
  }

  /** Put a key that is in neither Map. */
  private put(key: K, value: V): void {
    if (this.young.size >= this.half) {
      this.old = this.young
      this.young = new Map()
    }
    this.young.set(key, value)
    // An odd limit: two halves hold one more than the limit; drop the oldest entry not read since the turn-over.
    if (this.young.size + this.old.size > this.limit) this.old.delete(this.old.keys().next().value as K)
  }
}
