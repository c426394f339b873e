/**
 * A small memo table for pure derived values: a Map that drops its oldest entry (insertion order)
 * once it holds `limit` entries, so untrusted input can never grow it without bound. Values put in
 * it must be immutable (frozen, or strings and numbers) because every caller shares them.
 */
export class BoundedCache<K, V> {
  private readonly map = new Map<K, V>()

  constructor(readonly limit: number) {}

  get(key: K): V | undefined {
    return this.map.get(key)
  }

  set(key: K, value: V): V {
    if (this.map.size >= this.limit && !this.map.has(key)) this.map.delete(this.map.keys().next().value as K)
    this.map.set(key, value)
    return value
  }

  get size(): number {
    return this.map.size
  }

  clear(): void {
    this.map.clear()
  }
}
