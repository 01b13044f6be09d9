// Browser checks of the page at phone and tablet widths.
// Run by check.mjs; shared helpers in helpers.mjs.

import { readFileSync } from 'node:fs';
import { checks, url, browser, defaultName, shownValue, runAndWait, assert, assertEqual } from './helpers.mjs';

const check = checks('layout', import.meta.url);

for (const width of [360, 390, 1024]) {
  await check(`at ${width} px the page fits its screen: no sideways scroll, tabs and learners fit${width >= 1024 ? ', the editor shows its reward column' : ''}, Close stays reachable in the presentation view and the caption is kept`, async () => {
    const ctx = await browser.newContext({ viewport: { width, height: 760 }, deviceScaleFactor: 1, acceptDownloads: true });
    try {
      const page = await ctx.newPage();
      await page.goto(url + '/');
      await shownValue(page, defaultName);
      const fits = () => page.evaluate(() => document.scrollingElement.scrollWidth <= document.documentElement.clientWidth);
      for (const tab of ['solution', 'editor', 'graph', 'experiment', 'library']) {
        await page.click(`#tab-${tab}`);
        assert(await fits(), `${tab}: no sideways scroll`);
      }
      const lastTab = await page.locator('#tab-library').boundingBox();
      assert(lastTab.x + lastTab.width <= width, 'every tab is on screen');
      await page.click('#tab-experiment');
      const learner = await page.locator('#learner-rows tr').first().boundingBox();
      assert(learner.x + learner.width <= width, 'a learner row fits');
      if (width >= 1024) {
        await page.click('#tab-editor');
        const reward = await page.locator('.reward-input').first().boundingBox();
        assert(reward.x + reward.width <= width, 'the reward column is on screen without scrolling');
      }
      await page.click('#tab-experiment');
      await page.fill('#exp-episodes', '200');
      await runAndWait(page);
      assert(await fits(), 'results: no sideways scroll');
      await page.click('#present');
      // The chart's own caption reads whole, wrapped to the screen (it was a
      // one-line field that showed its start only on a phone).
      const caption = await page.$eval('#present-caption', (t) => ({ text: t.value.length, sw: t.scrollWidth, cw: t.clientWidth, sh: t.scrollHeight, ch: t.clientHeight, bottom: t.getBoundingClientRect().bottom }));
      assert(caption.text > 40 && caption.sw <= caption.cw && caption.sh <= caption.ch + 1 && caption.bottom <= 760, `the caption reads whole: ${JSON.stringify(caption)}`);
      const closeFirst = await page.locator('#present-close').boundingBox();
      assert(closeFirst.y + closeFirst.height <= 760 && closeFirst.x + closeFirst.width <= width, `Close is on screen beside the whole caption: ${JSON.stringify(closeFirst)}`);
      await page.fill('#present-caption', 'For Thursday');
      const close = await page.locator('#present-close').boundingBox();
      assert(close.y + close.height <= 760 && close.x + close.width <= width, `Close is on screen: ${JSON.stringify(close)}`);
      const hit = await page.evaluate(([x, y]) => document.elementFromPoint(x, y)?.id, [close.x + close.width / 2, close.y + close.height / 2]);
      assertEqual(hit, 'present-close', 'nothing covers Close');
      await page.click('#present-close');
      await page.click('#present');
      assertEqual(await page.inputValue('#present-caption'), 'For Thursday', 'the caption is kept on reopening');
    } finally {
      await ctx.close();
    }
  });
}

await check('at 390 px a kept learner\'s code reads without sideways scrolling, the page under the presentation view does not scroll, and results opened from a file say why they cannot go to the library', async () => {
  const ctx = await browser.newContext({ viewport: { width: 390, height: 760 }, deviceScaleFactor: 1, acceptDownloads: true });
  try {
    const page = await ctx.newPage();
    await page.goto(url + '/');
    await shownValue(page, defaultName);
    await page.click('#tab-experiment');
    // A module with a line far wider than a phone: wrapped, not scrolled.
    const source = `export default function start(intro) { const row = new Array(intro.actions).fill(1 / intro.actions); /* ${'a long comment '.repeat(12)}*/\n  return { decide: (b) => (b.done === 0 ? { probabilities: Array.from({ length: intro.horizon }, () => Array.from({ length: intro.states }, () => row)) } : { keep: true }) };\n}\n`;
    await page.setInputFiles('#guest-file', { name: 'wide.mjs', mimeType: 'text/javascript', buffer: Buffer.from(source) });
    await page.waitForFunction(() => document.getElementById('guest-status').textContent.includes('"wide"'), null, { timeout: 15000 });
    await page.getByRole('button', { name: 'Keep in this browser' }).click();
    await page.reload();
    await shownValue(page, defaultName);
    await page.click('#tab-experiment');
    await page.getByRole('button', { name: 'Show code and use…' }).click();
    await page.waitForSelector('#guest-code[open]');
    const code = await page.evaluate(() => {
      const d = document.getElementById('guest-code').getBoundingClientRect();
      const pre = document.getElementById('guest-code-text');
      return { left: d.left, right: d.right, over: pre.scrollWidth - pre.clientWidth, text: pre.textContent };
    });
    assertEqual(code.text, source, 'the whole code is shown');
    assert(code.left >= 0 && code.right <= 390 && code.over <= 0, `the code fits at 390 px: ${JSON.stringify({ ...code, text: undefined })}`);
    await page.click('#guest-code-use');
    await page.waitForFunction(() => /"wide" is loaded/.test(document.getElementById('guest-status').textContent), null, { timeout: 15000 });
    // The presentation view covers the page, which stops scrolling under it (no scrollbar shows through).
    await page.fill('#exp-episodes', '50');
    await runAndWait(page);
    const overflow = () => page.evaluate(() => [getComputedStyle(document.documentElement).overflowY, getComputedStyle(document.body).overflowY].join(' '));
    const before = await overflow();
    await page.click('#present');
    assertEqual(await overflow(), 'hidden hidden', 'the page does not scroll under the presentation');
    await page.click('#present-close');
    assertEqual(await overflow(), before, 'scrolling is back after Close');
    // Results opened from a results file: the library button is disabled and says why, visibly.
    const [dl] = await Promise.all([page.waitForEvent('download'), page.click('#export-json')]);
    const results = readFileSync(await dl.path(), 'utf8');
    await page.click('#save-results');
    assert(await page.isHidden('#save-results-why'), 'no reason shown while the results can be saved');
    await page.setInputFiles('#file-input', { name: 'mine.results.json', mimeType: 'application/json', buffer: Buffer.from(results) });
    await page.waitForFunction(() => /Showing results from mine\.results\.json/.test(document.getElementById('notice').textContent), null, { timeout: 10000 });
    assert(await page.isDisabled('#save-results'), 'Save to library is disabled');
    assert(await page.isVisible('#save-results-why'), 'the reason is on screen, not only on hover');
    assert((await page.textContent('#save-results-why')).includes('does not hold the experiment'), 'it says why');
    assertEqual(await page.getAttribute('#save-results', 'title'), await page.textContent('#save-results-why'), 'the button\'s title says the same');
  } finally {
    await ctx.close();
  }
});
