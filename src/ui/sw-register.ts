// Registers the offline service worker of the built app (sw.js, made by vite.config.ts). The dev server has no
// sw.js, so nothing is registered there; a browser without service workers simply runs online only.

export const OFFLINE_STATES = {
  /** No worker: dev server, an old browser, or registration refused. */
  unavailable: 'unavailable',
  /** The worker is installing this build's files. */
  installing: 'installing',
  /** Every file of this build is stored: the app opens with the network gone. */
  ready: 'ready',
} as const;
export type OfflineState = (typeof OFFLINE_STATES)[keyof typeof OFFLINE_STATES];

export interface OfflineStatus {
  state: OfflineState;
  /** Why there is no worker, when registration failed. */
  reason?: string;
}

/**
 * Registers sw.js at the app's base and resolves once it is active (or when it cannot be). Never rejects: offline
 * support is a bonus, so a failure is reported, not thrown.
 */
export async function registerServiceWorker(
  container: ServiceWorkerContainer | undefined = typeof navigator !== 'undefined' ? navigator.serviceWorker : undefined,
): Promise<OfflineStatus> {
  if (!import.meta.env.PROD || !container) return { state: OFFLINE_STATES.unavailable };
  const base = import.meta.env.BASE_URL;
  try {
    const registration = await container.register(`${base}sw.js`, { scope: base });
    if (registration.active) return { state: OFFLINE_STATES.ready };
    await container.ready;
    return { state: OFFLINE_STATES.ready };
  } catch (e) {
    return { state: OFFLINE_STATES.unavailable, reason: e instanceof Error ? e.message : String(e) };
  }
}
