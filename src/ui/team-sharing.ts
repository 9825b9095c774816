// The one sharing of a tab: a Book shared through the team's server, begun from the Team page (share this Book, open
// the shared Book here, resume with the password) or picked up again by the shell after a reload. It goes on while
// the person visits other pages. Only one tab of a browser shares a Book at a time (a Web Lock): edits made in the
// other tabs reach it through the Book's own channel and are sent from there.
import { ShareBridge, askRole, createSharedBook } from '../store/share-bridge.ts';
import type { ShareTarget, TeamRole } from '../store/share-bridge.ts';
import type { BookService } from './book-service.ts';
import { forgetShare, keepShare, rememberedShare } from './share-session.ts';

export interface ActiveShare {
  bridge: ShareBridge;
  service: BookService;
  target: ShareTarget;
}

let active: (ActiveShare & { release: () => void }) | undefined;

/** Told ('change') when this tab's sharing begins or ends. */
export const shareEvents = new EventTarget();

/** This tab's sharing of the Book, if any. */
export function activeShare(service: BookService): ActiveShare | undefined {
  return active && active.service === service ? active : undefined;
}

/** Holds the browser-wide lock on sharing one replica; undefined when another tab holds it. */
function holdSharing(name: string): Promise<(() => void) | undefined> {
  if (typeof navigator === 'undefined' || !navigator.locks) return Promise.resolve(() => undefined);
  return new Promise((resolve) => {
    void navigator.locks.request(`rungbook-share:${name}`, { ifAvailable: true }, (lock) => {
      if (!lock) return resolve(undefined);
      return new Promise<void>((release) => resolve(() => release()));
    });
  });
}

/** The person's role: the server's answer, or (only when the server cannot be reached) the one it last gave here. */
async function roleFor(service: BookService, target: ShareTarget, how: 'share' | 'open' | 'resume'): Promise<TeamRole> {
  try {
    return await askRole(target);
  } catch (e) {
    const kept = rememberedShare(service.name);
    // fetch fails with a TypeError when nothing answers; a refusal from the server is an Error of askRole's own.
    if (how === 'resume' && e instanceof TypeError && kept && kept.user === target.user && kept.server === target.server) return kept.role;
    throw e;
  }
}

/**
 * Begins sharing the Book: `share` puts this Book on the server (owners only), `open` replaces the Book here by the
 * team's shared Book, `resume` picks up the sharing this Book had (changes made meanwhile are sent, what arrived is
 * taken in). Refuses, changing nothing, when the server does not accept the person or another tab already shares.
 */
export async function beginSharing(service: BookService, target: ShareTarget, how: 'share' | 'open' | 'resume'): Promise<ActiveShare> {
  if (activeShare(service)) throw new Error('This tab already shares the Book: stop that sharing first.');
  const replicaName = `${service.name}-shared-${target.book}`;
  const release = await holdSharing(replicaName);
  if (!release) throw new Error('Another tab of this browser already shares this Book: its changes reach the team from there, and edits made in this tab reach that one.');
  try {
    const role = await roleFor(service, target, how);
    if (how === 'share') {
      if (role !== 'owner') throw new Error(`Only an owner of the team may share a Book (${target.user} is ${role === 'editor' ? 'an editor' : 'a reader'}).`);
      await createSharedBook(target);
    } else if (how === 'open') {
      const replaced = await service.replaceBook(service.empty());
      if (!replaced.ok) throw new Error(replaced.message);
    }
    const bridge = await ShareBridge.open({ side: service, target, replicaName, start: how, role });
    if (how === 'share') await bridge.shareWholeBook();
    bridge.start();
    active = { bridge, service, target, release };
    endedWhy = undefined;
    keepShare(service.name, target, role);
    // The Book replaced by another here (a file, an empty or the demo Book): the bridge stops; so does the sharing.
    bridge.addEventListener('change', () => {
      if (bridge.status.state === 'stopped' && active?.bridge === bridge) endSharing(bridge.status.error);
    });
    shareEvents.dispatchEvent(new Event('change'));
    return active;
  } catch (e) {
    release();
    throw e;
  }
}

let endedWhy: string | undefined;

/** Why this tab's sharing ended by itself (the Book was replaced), if it did. */
export function sharingEndedWhy(): string | undefined {
  return endedWhy;
}

/** Ends this tab's sharing (the Book stays as it is here; the shared copy on the server too) and forgets it. */
export function endSharing(why?: string): void {
  endedWhy = why;
  if (!active) return;
  const { bridge, service, release } = active;
  active = undefined;
  if (bridge.status.state !== 'stopped') bridge.close();
  release();
  forgetShare(service.name);
  shareEvents.dispatchEvent(new Event('change'));
}
