/**
 * One lookup at a time per key: callers arriving while a lookup is under way share it
 * (many answers reach an expired cache entry at once under load). `store` runs only if
 * the lookup is still the registered one when it ends: clearing `underWay` (on an
 * invalidation) keeps a lookup that may have read old rows out of the cache.
 */
export async function sharedLookup<K, V>(underWay: Map<K, Promise<V>>, key: K, lookup: () => Promise<V>, store: (value: V) => void): Promise<V> {
  const running = underWay.get(key);
  if (running) return running;
  const current = lookup();
  underWay.set(key, current);
  try {
    const value = await current;
    if (underWay.get(key) === current) store(value);
    return value;
  } finally {
    if (underWay.get(key) === current) underWay.delete(key);
  }
}
