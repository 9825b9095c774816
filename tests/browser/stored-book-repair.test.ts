// A Book kept in the browser that does not read as a Book (damaged by another program, an older build or a broken
// profile) is refused with its place named, nothing is changed or lost: the stored records can be saved as a file,
// corrected and opened again, and a file that is still wrong is refused with its problems.
import { readFileSync } from 'node:fs';
import { afterEach, describe, expect, inject, it } from 'vitest';
import { parseBookFile } from '../../src/io/book-file.ts';
import { AppUnderTest, saved } from './harness.ts';

const baseUrl = inject('baseUrl');
const app = new AppUnderTest(baseUrl);
afterEach(() => app.close());

describe('a stored Book that does not read', () => {
  it('is refused naming the place, saved as it is, and replaced by a corrected file', async () => {
    const { page } = await app.open('#/family', { ready: '[data-testid="family-table"] tbody tr >> nth=0' });
    // A first start shows the demo Book before it is written: damage it once it is stored.
    await saved(page);
    // Damage one stored part: a rating that is text.
    const damaged = await page.evaluate(
      () =>
        new Promise<string>((resolve, reject) => {
          const open = indexedDB.open('rungbook');
          open.onerror = () => reject(open.error);
          open.onsuccess = () => {
            const db = open.result;
            const tx = db.transaction('parts', 'readwrite');
            const parts = tx.objectStore('parts');
            const all = parts.getAll();
            all.onsuccess = () => {
              const first = (all.result as { id: string; ratings: Record<string, unknown> }[])[0];
              if (!first) {
                reject(new Error('no part is stored yet'));
                return;
              }
              parts.put({ ...first, ratings: { ...first.ratings, p_max: 'a lot' } });
              tx.oncomplete = () => {
                db.close();
                resolve(first.id);
              };
            };
          };
        }),
    );
    await page.reload();
    const alert = page.locator('rb-app .failed[role="alert"]');
    await alert.waitFor();
    expect(await alert.textContent()).toMatch(/does not read as a Book, so it was not opened: parts\[0\]\.ratings\.p_max: must be a finite number, not text/);

    // The stored records, as they are, in a file.
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('repair-download').click()]);
    const stored = JSON.parse(readFileSync((await download.path())!, 'utf8')) as { parts: { id: string; ratings: Record<string, unknown> }[] };
    const part = stored.parts.find((p) => p.id === damaged)!;
    expect(part.ratings.p_max).toBe('a lot');

    // Still wrong: refused with its problems, nothing replaced.
    await page.getByTestId('repair-open').setInputFiles({ name: 'still.rungbook.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(stored)) });
    await page.getByTestId('repair-problems').waitFor();
    expect(await page.getByTestId('repair-problems').textContent()).toMatch(/parts\[0\]\.ratings\.p_max: must be a finite number, not text/);

    // Corrected: it reads whole, replaces the stored Book, and the app opens on it.
    part.ratings.p_max = 0.25;
    const corrected = JSON.stringify(stored);
    expect(parseBookFile(corrected).ok).toBe(true);
    await Promise.all([
      page.waitForEvent('load'),
      page.getByTestId('repair-open').setInputFiles({ name: 'corrected.rungbook.json', mimeType: 'application/json', buffer: Buffer.from(corrected) }),
    ]);
    await page.locator('[data-testid="family-table"] tbody tr').first().waitFor();
    expect(await page.locator('rb-app .failed').count()).toBe(0);
  });
});
