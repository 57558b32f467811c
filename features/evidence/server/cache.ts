import "server-only";
const store = globalThis as unknown as { __tankloreSummaries?: Map<string, { at: number; value: unknown }> };
const CACHE_MS = 1_000;

/**
 * The summary list is read far more often than it changes: keep each response for up to a second,
 * and drop them all whenever this process's evidence worker commits a recompute. Another process on
 * the same PostgreSQL server sees a change within that second.
 */
export async function summaryCache<T>(key: string, load: () => Promise<T>): Promise<T> {
  const cache = (store.__tankloreSummaries ??= new Map());
  const hit = cache.get(key);
  if (hit && Date.now() - hit.at < CACHE_MS) return hit.value as T;
  const value = await load();
  if (cache.size > 500) cache.clear();
  cache.set(key, { at: Date.now(), value });
  return value;
}

export function invalidateSummaryCache(): void {
  store.__tankloreSummaries?.clear();
}
