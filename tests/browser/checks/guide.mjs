// Browser checks of the definitions where the eye is (issue #34, item 2):
// a "?" beside every results-table header and every term of the guide that
// opens the core's definition, by click, keyboard or tap; the "How to read
// these results" guide, offered once per browser session after the first
// run; and (item 1) a compact results-table header at 390 px.
// Run by check.mjs; shared helpers in helpers.mjs.

import { readFileSync } from 'node:fs';
import { checks, url, browser, defaultName, shownValue, openPage, upload, runAndWait, assert, assertEqual } from './helpers.mjs';

const check = checks('guide', import.meta.url);

// The outside sources: the core's glossary (src/catalogue.rs, GLOSSARY) and
// its caveat about toy models (src/experiment/table.rs, CAVEAT), read from
// the Rust source itself rather than through the page.
const rustString = (s) => s.replace(/\\(["\\])/g, '$1');
const catalogueRs = readFileSync(new URL('../../../src/catalogue.rs', import.meta.url), 'utf8');
const GLOSSARY = new Map([...catalogueRs.matchAll(/Term \{\s*key: "([^"]+)",\s*name: "((?:[^"\\]|\\.)*)",\s*meaning: "((?:[^"\\]|\\.)*)",\s*\}/g)]
  .map(([, key, name, meaning]) => [key, { name: rustString(name), meaning: rustString(meaning) }]));
const CAVEAT = rustString(/pub const CAVEAT: &str = "((?:[^"\\]|\\.)*)";/.exec(readFileSync(new URL('../../../src/experiment/table.rs', import.meta.url), 'utf8'))[1]);
assert(GLOSSARY.size >= 10 && GLOSSARY.get('burn_in').meaning.includes('"not settled"'), `the glossary read from src/catalogue.rs: ${[...GLOSSARY.keys()]}`);

/** The glossary keys each header of the one-point table stands for (what its cells show). */
const HEADER_KEYS = [
  [/^regret at K$/, ['regret']],
  [/^95% interval$/, ['interval']],
  [/^slope \[95% bootstrap\]$/, ['slope']],
  [/^burn-in \[95% bootstrap\]$/, ['burn_in']],
  [/^model updates$/, ['model_updates']],
  [/^ε = .*first ε-optimal episode.*share ε-optimal.*settled within ε after$/, ['first_optimal', 'optimal_share', 'settled']],
];
/** The guide's terms and the glossary key of each. */
const GUIDE_KEYS = { 'Cumulative regret': 'regret', 'The band': 'interval', Slope: 'slope', 'Burn-in': 'burn_in', 'Published bound': 'bound', 'Lower bound': 'lower_bound' };

/** The open definition: [{name, meaning}] and where it is, or null when none is shown. */
const shownDefinition = (page) => page.evaluate(() => {
  const p = document.getElementById('definition');
  if (!p || p.hidden) return null;
  const r = p.getBoundingClientRect();
  return {
    terms: [...p.querySelectorAll('dt')].map((dt) => ({ name: dt.textContent, meaning: dt.nextElementSibling.textContent })),
    left: r.left, right: r.right, top: r.top, bottom: r.bottom, width: document.documentElement.clientWidth, height: window.innerHeight,
  };
});

/** Asserts that the open definition is exactly the glossary's entries `keys`, on screen. */
function assertDefinition(shown, keys, what) {
  assert(shown, `${what}: a definition is shown`);
  assertEqual(JSON.stringify(shown.terms), JSON.stringify(keys.map((k) => GLOSSARY.get(k))), `${what}: the core's definition`);
  assert(shown.left >= 0 && shown.right <= shown.width && shown.top >= 0 && shown.bottom <= shown.height, `${what}: the definition is on screen ${JSON.stringify({ ...shown, terms: undefined })}`);
}

/** A "?" as the eye sees it: shown, its mark "?", a target of at least 24 × 24 px. */
async function assertVisibleMark(button, what) {
  assert(await button.isVisible(), `${what}: its "?" is visible`);
  const look = await button.evaluate((b) => ({ mark: getComputedStyle(b, '::before').content, tag: b.tagName, label: b.getAttribute('aria-label'), w: b.getBoundingClientRect().width, h: b.getBoundingClientRect().height }));
  assertEqual(look.mark, '"?"', `${what}: the mark`);
  assertEqual(look.tag, 'BUTTON', `${what}: a real button`);
  assert(/^What .* means$/.test(look.label), `${what}: it is named for a screen reader (${look.label})`);
  assert(look.w >= 24 && look.h >= 24, `${what}: a 24 px target (WCAG 2.2, 2.5.8): ${look.w} × ${look.h}`);
}

/** Whether the guide is shown, and where. */
const guideBox = (page) => page.evaluate(() => {
  const g = document.getElementById('guide');
  const r = g.getBoundingClientRect();
  return { shown: !g.hidden && r.height > 0, top: r.top, bottom: r.bottom, height: r.height, scroll: g.scrollHeight - g.clientHeight, viewport: window.innerHeight };
});

await check('every results-table header and every term of the guide has a "?" that opens the core\'s definition; one at a time; a second click, Escape or a click elsewhere closes it; Enter opens it', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '300');
  await runAndWait(page);
  const heads = page.locator('#results-table thead th');
  const names = await heads.allTextContents();
  assertEqual(names[0], 'learner', 'the first column names the learners (no number, no definition)');
  assertEqual(await heads.nth(0).locator('button.def').count(), 0, 'no "?" on the learner column');
  assert(names.length >= 8, `every column, ε columns included: ${names}`);
  let previous = null;
  for (let i = 1; i < names.length; i++) {
    const keys = HEADER_KEYS.find(([re]) => re.test(names[i]))?.[1];
    assert(keys, `a header this check knows: "${names[i]}"`);
    const button = heads.nth(i).locator('button.def');
    await assertVisibleMark(button, names[i]);
    await button.click();
    assertDefinition(await shownDefinition(page), keys, names[i]);
    assertEqual(await button.getAttribute('aria-expanded'), 'true', `${names[i]}: its "?" says it is open`);
    if (previous) assertEqual(await previous.getAttribute('aria-expanded'), 'false', `${names[i]}: the one before closed (one open at a time)`);
    assertEqual(await page.locator('.def-panel:not([hidden])').count(), 1, 'one definition on screen');
    previous = button;
  }
  // A second click on the same "?" closes it.
  await previous.click();
  assertEqual(await shownDefinition(page), null, 'a second click closes it');
  // Escape closes it and gives the keyboard back to its "?"; Enter opens it.
  const slope = heads.nth(names.indexOf('slope [95% bootstrap]')).locator('button.def');
  await slope.focus();
  await page.keyboard.press('Enter');
  assertDefinition(await shownDefinition(page), ['slope'], 'Enter on the slope\'s "?"');
  await page.keyboard.press('Escape');
  assertEqual(await shownDefinition(page), null, 'Escape closes it');
  assert(await slope.evaluate((b) => b === document.activeElement), 'the keyboard is back on the "?"');
  // Tab reaches its Close; tabbing past it closes it and comes back to the "?".
  await page.keyboard.press('Enter');
  await page.keyboard.press('Tab');
  assertEqual(await page.evaluate(() => document.activeElement?.className), 'def-close', 'Tab reaches Close');
  await page.keyboard.press('Tab');
  assertEqual(await shownDefinition(page), null, 'tabbing out closes it');
  assert(await slope.evaluate((b) => b === document.activeElement), 'and the keyboard is back on the "?"');
  // A click elsewhere closes it; its Close button does too.
  await slope.click();
  await page.click('#results-heading');
  assertEqual(await shownDefinition(page), null, 'a click elsewhere closes it');
  await slope.click();
  await page.click('#definition .def-close');
  assertEqual(await shownDefinition(page), null, 'Close closes it');
  // The glossary title on hover stays (results.mjs checks it); the header text is the header's alone.
  assertEqual(await heads.nth(1).textContent(), 'regret at K', 'the "?" adds no text to its header');
  // The guide (shown after this first run) defines its terms the same way.
  assert((await guideBox(page)).shown, 'the guide is shown after the first run');
  const terms = page.locator('#guide .guide-terms dt');
  assertEqual(await terms.count(), Object.keys(GUIDE_KEYS).length, 'the guide\'s terms');
  for (let i = 0; i < await terms.count(); i++) {
    const term = (await terms.nth(i).textContent()).trim();
    const key = GUIDE_KEYS[term];
    assert(key, `a term this check knows: "${term}"`);
    const button = terms.nth(i).locator('button.def');
    await assertVisibleMark(button, `guide: ${term}`);
    await button.click();
    assertDefinition(await shownDefinition(page), [key], `guide: ${term}`);
  }
  await page.keyboard.press('Escape');
});

await check('a sweep\'s value headers each open the definitions of what their cells show', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '200');
  await page.fill('#exp-seeds', '2');
  const rows = page.locator('#learner-rows tr');
  for (let i = 2; i < await rows.count(); i++) await rows.nth(i).locator('input[type=checkbox]:not(.swept)').uncheck();
  await page.selectOption('#sweep-param', 'bonus_scale');
  await page.fill('#sweep-values', '0.01, 0.1');
  await runAndWait(page);
  const heads = page.locator('#results-table thead th');
  assertEqual((await heads.allTextContents()).join('|'), 'learner|bonus_scale = 0.01|bonus_scale = 0.1', 'the sweep table');
  // Each cell: regret at K, its interval, and the readings slope and burn-in.
  for (const i of [1, 2]) {
    const button = heads.nth(i).locator('button.def');
    await assertVisibleMark(button, `sweep column ${i}`);
    await button.click();
    assertDefinition(await shownDefinition(page), ['regret', 'interval', 'slope', 'burn_in'], `sweep column ${i}`);
  }
  const reading = await page.locator('#results-table tbody td .reading').first().textContent();
  assert(/^slope .* · burn-in /.test(reading), `the readings its "?" defines are in the cells: ${reading}`);
});

await check('a sweep over a size: each learner\'s scaling reading opens the core\'s definition of it', async (page) => {
  await openPage(page);
  const exp = {
    format: 'burnin-experiment', version: 1, name: 'scaling',
    generator: { kind: 'lower-bound', actions: 2, horizon: 8, depth: 1 },
    episodes: 500, seeds: 2, seed: 3,
    learners: [{ algorithm: 'uniform' }, { algorithm: 'psrl' }],
    sweep: { parameter: 'depth', values: [1, 2] },
  };
  await upload(page, 'scaling.json', JSON.stringify(exp));
  await page.waitForSelector('#panel-experiment:not([hidden])');
  await runAndWait(page);
  const rows = page.locator('#results-table tr.scaling-row th');
  assertEqual(await rows.count(), 2, 'a scaling reading per learner');
  for (let i = 0; i < 2; i++) {
    const button = rows.nth(i).locator('button.def');
    await assertVisibleMark(button, `scaling row ${i}`);
    await button.click();
    assertDefinition(await shownDefinition(page), ['scaling'], `scaling row ${i}`);
  }
  assert(/^uniform: scaling in S$/.test(await rows.nth(0).textContent()), 'the "?" adds no text to the row\'s name');
});

for (const [width, height] of [[390, 760], [1366, 768]]) {
  await check(`at ${width} × ${height} the guide comes once per browser session, after the first run, on one screen without scrolling; its link opens it again; it ends with the core's caveat`, async () => {
    const ctx = await browser.newContext({ viewport: { width, height }, deviceScaleFactor: 1, acceptDownloads: true });
    try {
      const page = await ctx.newPage();
      await page.goto(url + '/');
      await shownValue(page, defaultName);
      await page.click('#tab-experiment');
      await page.fill('#exp-episodes', '100');
      assert(await page.isHidden('#guide'), 'no guide before a run');
      await runAndWait(page);
      const first = await guideBox(page);
      assert(first.shown, 'the first run offers the guide');
      // One screen: all of it in view where the run left the page, nothing to scroll inside it.
      assert(first.height <= height && first.top >= -1 && first.bottom <= height + 1 && first.scroll <= 0, `the guide fits one screen as shown: ${JSON.stringify(first)}`);
      assertEqual((await page.textContent('#guide-caveat')).trim(), CAVEAT, 'the caveat is the core\'s (src/experiment/table.rs)');
      assertEqual(await page.getAttribute('#guide-open', 'aria-expanded'), 'true', 'its link says it is open');
      await page.click('#guide-close');
      assert(!(await guideBox(page)).shown, 'Close hides it');
      assertEqual(await page.evaluate(() => document.activeElement?.id), 'guide-open', 'the keyboard goes to its link');
      // A second run in the same session does not offer it again.
      await page.fill('#exp-episodes', '120');
      await runAndWait(page);
      assert(!(await guideBox(page)).shown, 'a second run does not show it again');
      // Neither does a run after a reload (the same browser session).
      await page.reload();
      await shownValue(page, defaultName);
      await page.click('#tab-experiment');
      await runAndWait(page);
      assert(!(await guideBox(page)).shown, 'after a reload (same session): not again');
      // The visible link near the results opens it again, on one screen, and closes it.
      assert(await page.isVisible('#guide-open'), 'the link is visible');
      await page.click('#guide-open');
      const again = await guideBox(page);
      assert(again.shown && again.top >= -1 && again.bottom <= height + 1 && again.scroll <= 0, `the link opens it on one screen: ${JSON.stringify(again)}`);
      await page.click('#guide-open');
      assert(!(await guideBox(page)).shown, 'the link closes it too');
      // A new browser session (a new tab: its own session storage) offers it once more.
      const fresh = await ctx.newPage();
      await fresh.goto(url + '/');
      await shownValue(fresh, defaultName);
      await fresh.click('#tab-experiment');
      await fresh.fill('#exp-episodes', '100');
      await runAndWait(fresh);
      assert((await guideBox(fresh)).shown, 'a new session offers it');
      await fresh.keyboard.press('Escape');
      assert(!(await guideBox(fresh)).shown, 'Escape in the guide closes it');
    } finally {
      await ctx.close();
    }
  });
}

await check('at 390 px, by touch: each header\'s "?" opens its definition on a tap and closes on a second; the header block is at most three lines tall and the table scrolls sideways in its own box', async () => {
  const ctx = await browser.newContext({ viewport: { width: 390, height: 760 }, deviceScaleFactor: 2, hasTouch: true, isMobile: true, acceptDownloads: true });
  try {
    const page = await ctx.newPage();
    await page.goto(url + '/');
    await shownValue(page, defaultName);
    await page.tap('#tab-experiment');
    await page.fill('#exp-episodes', '200');
    await runAndWait(page);
    await page.tap('#guide-close');
    // The header block: before this change 208 px at 390 px (the ε headers
    // wrapped a word a line, 13 lines); now no more than three text lines.
    const head = await page.evaluate(() => {
      const thead = document.querySelector('#results-table thead');
      const th = thead.querySelector('th');
      const wrap = document.getElementById('results-table');
      return { height: thead.getBoundingClientRect().height, line: parseFloat(getComputedStyle(th).lineHeight), rows: thead.rows.length, wrapScroll: wrap.scrollWidth, wrapWidth: wrap.clientWidth, page: document.scrollingElement.scrollWidth, screen: document.documentElement.clientWidth };
    });
    console.log(`     (390 px: results-table header ${head.height.toFixed(1)} px, line ${head.line} px)`);
    assertEqual(head.rows, 1, 'one header row');
    assert(head.height <= 3 * head.line + 12, `the header is at most three lines (${head.height} px > 3 × ${head.line} + 12 px padding)`);
    assert(head.page <= head.screen, `the page does not scroll sideways (${head.page} > ${head.screen})`);
    assert(head.wrapScroll > head.wrapWidth, `the table scrolls sideways inside its box (${head.wrapScroll} vs ${head.wrapWidth})`);
    const moved = await page.evaluate(() => { const w = document.getElementById('results-table'); w.scrollLeft = 200; return w.scrollLeft; });
    assert(moved > 0, 'its box scrolls');
    await page.evaluate(() => { document.getElementById('results-table').scrollLeft = 0; });
    // Taps: each visible "?" opens its definition, on screen; a second tap closes it.
    const names = await page.locator('#results-table thead th').allTextContents();
    for (let i = 1; i < names.length; i++) {
      const keys = HEADER_KEYS.find(([re]) => re.test(names[i]))[1];
      const button = page.locator('#results-table thead th').nth(i).locator('button.def');
      await button.scrollIntoViewIfNeeded();
      await assertVisibleMark(button, names[i]);
      await button.tap();
      assertDefinition(await shownDefinition(page), keys, `tap: ${names[i]}`);
      await button.tap();
      assertEqual(await shownDefinition(page), null, `tap: ${names[i]}: a second tap closes it`);
    }
    // A tap elsewhere closes it.
    const first = page.locator('#results-table thead th').nth(1).locator('button.def');
    await first.scrollIntoViewIfNeeded();
    await first.tap();
    assert(await shownDefinition(page), 'open again');
    await page.tap('#results-heading');
    assertEqual(await shownDefinition(page), null, 'a tap elsewhere closes it');
  } finally {
    await ctx.close();
  }
});

await check('at 1366 px the results table fits its card with a header of at most 160 px, and the export buttons keep their own height', async () => {
  const ctx = await browser.newContext({ viewport: { width: 1366, height: 768 }, deviceScaleFactor: 1, acceptDownloads: true });
  try {
    const page = await ctx.newPage();
    await page.goto(url + '/');
    await shownValue(page, defaultName);
    await page.click('#tab-experiment');
    await runAndWait(page);
    // Before: 208 px (the ε headers wrapped to 13 lines at the width of
    // their cells) and the buttons beside the table-format chooser
    // stretched to its height (106 px).
    const m = await page.evaluate(() => {
      const wrap = document.getElementById('results-table');
      const buttons = [...document.querySelectorAll('.export-row > button, .table-export button')].filter((b) => !b.hidden);
      return {
        head: wrap.querySelector('thead').getBoundingClientRect().height,
        scroll: wrap.scrollWidth, client: wrap.clientWidth,
        tallest: Math.max(...buttons.map((b) => b.getBoundingClientRect().height)),
        buttons: buttons.length,
      };
    });
    console.log(`     (1366 px: results-table header ${m.head.toFixed(1)} px, tallest export button ${m.tallest.toFixed(1)} px)`);
    assert(m.head <= 160, `the header is at most 160 px high (${m.head})`);
    assert(m.scroll <= m.client, `the table fits its card (${m.scroll} > ${m.client})`);
    assert(m.buttons >= 9 && m.tallest <= 48, `no export button is stretched (${m.buttons} buttons, the tallest ${m.tallest} px)`);
  } finally {
    await ctx.close();
  }
});
