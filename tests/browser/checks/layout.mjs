// Browser checks of the page at phone and tablet widths.
// Run by check.mjs; shared helpers in helpers.mjs.

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
