// Browser checks of the library and saved work: saving, reloads, damaged storage, two tabs, old entries.
// Run by check.mjs; shared helpers in helpers.mjs.

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { checks, url, expected, out, fixtures, index, demoName, defaultName, shownValue, openAny, openPage, upload, startRun, runAndWait, downloadText, assert, assertEqual } from './helpers.mjs';

const check = checks('library', import.meta.url);

await check('a model file saved from the page opens again the same', async (page) => {
  await openPage(page);
  await page.selectOption('#demo-select', 'pearl-reef.json');
  const v = await shownValue(page, await demoName('pearl-reef.json'));
  const file = await downloadText(page, '#save-model');
  await page.selectOption('#demo-select', index.default);
  await shownValue(page, defaultName);
  await upload(page, file.name, file.text);
  assertEqual((await shownValue(page, await demoName('pearl-reef.json'))).data, v.data, 'same optimal value');
});

await check('saved work survives a reload, and the library renames, duplicates and deletes (asking first)', async (page) => {
  await openPage(page);
  await page.selectOption('#demo-select', 'night-ferry.json');
  const v = await shownValue(page, 'Night ferry');
  await page.click('#tab-library');
  await page.click('#save-current');
  await page.reload();
  // The autosave reopens the ferry, not the default demo.
  await shownValue(page, 'Night ferry');
  await page.click('#tab-library');
  const item = page.locator('#library-list li', { hasText: 'Night ferry' });
  assertEqual(await item.count(), 1, 'saved entry listed');
  await item.getByRole('button', { name: 'Rename Night ferry' }).click();
  await page.fill('#library-list input[type=text]', 'Ferry, kept');
  await page.click('text=Save name');
  await page.getByRole('button', { name: 'Duplicate Ferry, kept' }).click();
  assertEqual(await page.locator('#library-list .entry-name').allTextContents().then((t) => t.sort().join('|')), 'Ferry, kept|Ferry, kept (copy)', 'renamed and duplicated');
  await page.getByRole('button', { name: 'Delete Ferry, kept (copy)' }).click();
  assert(await page.locator('#confirm-dialog').isVisible(), 'delete asks first');
  await page.click('#confirm-dialog button[value=cancel]');
  assertEqual(await page.locator('#library-list li').count(), 2, 'kept after “Keep it”');
  await page.getByRole('button', { name: 'Delete Ferry, kept (copy)' }).click();
  await page.click('#confirm-ok');
  await page.waitForFunction(() => document.querySelectorAll('#library-list li').length === 1, null, { timeout: 5000 });
  await page.selectOption('#demo-select', index.default);
  await shownValue(page, defaultName);
  await page.getByRole('button', { name: 'Open Ferry, kept' }).click();
  assertEqual((await shownValue(page, 'Night ferry')).data, v.data, 'opened from the library');
  // The screenshot shows the library itself (opening an entry shows its solution).
  await page.click('#tab-library');
  await page.screenshot({ path: join(out, 'library.png') });
});

await check('a damaged stored item is skipped and a full storage keeps the old data', async (page) => {
  await openPage(page);
  await page.click('#tab-library');
  await page.click('#save-current');
  await page.evaluate(() => localStorage.setItem('burnin:v1:entry:broken', '{not json'));
  await page.click('#tab-solution');
  await page.click('#tab-library');
  assertEqual(await page.locator('#library-list li').count(), 1, 'the good item is still listed');
  assert((await page.locator('#library-status').textContent()).includes('damaged'), 'the damaged one is reported');
  // Fill the quota, then try to save.
  await page.evaluate(() => {
    const big = 'x'.repeat(1 << 20);
    for (let i = 0; i < 100; i++) { try { localStorage.setItem(`filler${i}`, big); } catch { break; } }
    let small = 'x'.repeat(1 << 16);
    for (let i = 0; i < 1000; i++) { try { localStorage.setItem(`fill${i}`, small); } catch { break; } }
    for (let i = 0; i < 1000; i++) { try { localStorage.setItem(`f${i}`, 'x'.repeat(256)); } catch { break; } }
  });
  await page.click('#save-current');
  const note = await page.locator('#notice').textContent();
  assert(note.includes('full'), `full storage reported: ${note}`);
  assertEqual(await page.locator('#library-list li').count(), 1, 'old data kept');
  assert(await page.evaluate(() => localStorage.getItem('burnin:v1:entry:broken') === '{not json'), 'the damaged item was left untouched');
});

await check('opening another model asks before clearing results that are not saved', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '200');
  await runAndWait(page);
  await page.selectOption('#demo-select', 'night-ferry.json');
  await page.waitForSelector('#replace-results[open]');
  await page.click('#replace-results-keep');
  assert(await page.isVisible('#results'), 'the results stay');
  assertEqual(await page.inputValue('#demo-select'), index.default, 'the selector shows what is open');
  assertEqual((await shownValue(page, defaultName)).data, expected[index.default], 'the model stays');
  // Saved results are not asked about.
  await page.click('#save-results');
  await page.selectOption('#demo-select', 'night-ferry.json');
  await shownValue(page, await demoName('night-ferry.json'));
  assert(!(await page.isVisible('#replace-results')), 'no question once saved');
  // A fresh run, then a file: asked again; "open" clears.
  await page.click('#tab-experiment');
  await runAndWait(page);
  await upload(page, 'pearl.json', await (await fetch(`${url}/demo-models/pearl-reef.json`)).text());
  await page.waitForSelector('#replace-results[open]');
  await page.click('#replace-results-open');
  await shownValue(page, 'Pearl reef');
  assert(!(await page.isVisible('#results')), 'the results are cleared after saying so');
});

await check('a reload in the middle of a run loses nothing saved', async (page) => {
  await openPage(page);
  await page.selectOption('#demo-select', 'pearl-reef.json');
  await shownValue(page, 'Pearl reef');
  await page.click('#tab-library');
  await page.click('#save-current');
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '100000000');
  await startRun(page);
  await page.waitForFunction(() => Number(document.getElementById('exp-progress').value) > 0, null, { timeout: 20000 });
  await page.reload();
  await shownValue(page, 'Pearl reef');
  assertEqual(await page.inputValue('#exp-episodes'), '100000000', 'the set-up was kept');
  await page.click('#tab-library');
  assertEqual(await page.locator('#library-list li').count(), 1, 'the library is intact');
});

await check('two open tabs keep their own work', async (page, context) => {
  await openPage(page);
  await page.selectOption('#demo-select', 'night-ferry.json');
  await shownValue(page, 'Night ferry');
  const other = await context.newPage();
  await openAny(other);
  await other.selectOption('#demo-select', 'seed-trial.json');
  await shownValue(other, 'Seed trial');
  await other.waitForTimeout(500);
  await page.reload();
  // Each tab's autosave is its own: the first tab still has its ferry.
  await shownValue(page, 'Night ferry');
  await other.reload();
  await shownValue(other, 'Seed trial');
  // A save in one tab shows up in the other's library.
  await page.click('#tab-library');
  await other.click('#tab-library');
  await other.click('#save-current');
  await page.waitForFunction(() => [...document.querySelectorAll('#library-list .entry-name')].some((e) => e.textContent === 'Seed trial'));
  assert((await page.locator('#notice').textContent()).includes('another tab'), 'the other tab says so');
});

await check('a library entry stored by version 1 still opens', async (page) => {
  await openPage(page);
  const entry = readFileSync(join(fixtures, 'library-entry-v1.json'), 'utf8');
  await page.evaluate((e) => localStorage.setItem(`burnin:v1:entry:${JSON.parse(e).id}`, e), entry);
  await page.click('#tab-solution');
  await page.click('#tab-library');
  await page.getByRole('button', { name: 'Open Stored ferry (v1)' }).click();
  await shownValue(page, 'Night ferry');
  await page.waitForSelector('#results:not([hidden])');
  assertEqual(await page.locator('#results-table tbody tr').count(), 2, 'its results are shown');
});
