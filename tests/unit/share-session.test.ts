// What a tab keeps of a sharing across reloads and visits (src/ui/share-session.ts), with the browser's two storages
// stood in by maps: the sharing remembered without its password for later visits, the whole of it for this tab, and
// anything stored that is not one (edited by hand, an older form, another Book's) read as nothing kept.
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { forgetShare, keepShare, rememberedShare, sessionShare } from '../../src/ui/share-session.ts';

class MemoryStorage implements Storage {
  private readonly items = new Map<string, string>();
  get length(): number {
    return this.items.size;
  }
  clear(): void {
    this.items.clear();
  }
  getItem(key: string): string | null {
    return this.items.get(key) ?? null;
  }
  key(index: number): string | null {
    return [...this.items.keys()][index] ?? null;
  }
  removeItem(key: string): void {
    this.items.delete(key);
  }
  setItem(key: string, value: string): void {
    this.items.set(key, String(value));
  }
}

const scope = globalThis as { localStorage?: Storage; sessionStorage?: Storage };
const target = { server: 'http://127.0.0.1:5990/', book: 'fan-family', user: 'ines', password: 'pw-1' };

beforeEach(() => {
  scope.localStorage = new MemoryStorage();
  scope.sessionStorage = new MemoryStorage();
});
afterEach(() => {
  delete scope.localStorage;
  delete scope.sessionStorage;
});

describe('a kept sharing', () => {
  it('is remembered without its password for the Book, and whole for this tab', () => {
    keepShare('rungbook', target, 'editor');
    expect(rememberedShare('rungbook')).toEqual({ server: target.server, book: target.book, user: target.user, role: 'editor' });
    expect(scope.localStorage!.getItem('rungbook-sharing:rungbook')).not.toContain('pw-1');
    expect(sessionShare('rungbook')).toEqual(target);
    // Another Book of this browser has none.
    expect(rememberedShare('rungbook-other')).toBeUndefined();
    expect(sessionShare('rungbook-other')).toBeUndefined();
    forgetShare('rungbook');
    expect(rememberedShare('rungbook')).toBeUndefined();
    expect(sessionShare('rungbook')).toBeUndefined();
  });

  it('reads anything stored that is not one as nothing kept', () => {
    const remember = (text: string) => scope.localStorage!.setItem('rungbook-sharing:rungbook', text);
    for (const text of ['not json', 'null', '5', '"text"', '[]', '{}', JSON.stringify({ ...target, role: 'boss' }), JSON.stringify({ ...target, user: 7, role: 'owner' }), JSON.stringify({ ...target, server: 'ftp://x/', role: 'owner' })]) {
      remember(text);
      expect(rememberedShare('rungbook'), text).toBeUndefined();
    }
    remember(JSON.stringify({ server: target.server, book: target.book, user: target.user, role: 'reader' }));
    expect(rememberedShare('rungbook')?.role).toBe('reader');
    // This tab's whole sharing counts only beside the Book's remembered one, for the same server, Book and user.
    scope.sessionStorage!.setItem('rungbook-sharing', JSON.stringify({ ...target, user: 'someone-else' }));
    expect(sessionShare('rungbook')).toBeUndefined();
    scope.sessionStorage!.setItem('rungbook-sharing', 'not json');
    expect(sessionShare('rungbook')).toBeUndefined();
  });
});
