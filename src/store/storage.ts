// Persistent storage and usage figures from the browser, feature-detected: undefined where the browser has none.
import type { StorageEstimate } from './types.ts';

type StorageLike = Pick<StorageManager, 'persist' | 'persisted' | 'estimate'>;

function browserStorage(): Partial<StorageLike> | undefined {
  return (globalThis as { navigator?: { storage?: Partial<StorageLike> } }).navigator?.storage;
}

/**
 * Asks the browser not to evict this origin's data under storage pressure. Resolves to whether the data is
 * persistent now, or undefined where the browser offers no such request.
 */
export async function requestPersistence(storage: Partial<StorageLike> | undefined = browserStorage()): Promise<boolean | undefined> {
  if (!storage || typeof storage.persist !== 'function') return undefined;
  try {
    if (typeof storage.persisted === 'function' && (await storage.persisted())) return true;
    return await storage.persist();
  } catch {
    // Some browsers reject instead of answering false (for example in private windows).
    return false;
  }
}

/** Bytes used and available to this origin, and whether they are persistent; undefined where unknown. */
export async function storageEstimate(storage: Partial<StorageLike> | undefined = browserStorage()): Promise<StorageEstimate | undefined> {
  if (!storage || typeof storage.estimate !== 'function') return undefined;
  try {
    const e = await storage.estimate();
    if (typeof e.usage !== 'number' || typeof e.quota !== 'number') return undefined;
    const persisted = typeof storage.persisted === 'function' ? await storage.persisted() : false;
    return { usage: e.usage, quota: e.quota, persisted };
  } catch {
    return undefined;
  }
}
