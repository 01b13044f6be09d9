// Browser checks of the model and its solution: opening (demos, files, drops, the generator), the solution tables, problems.
// Run by check.mjs; shared helpers in helpers.mjs.

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { checks, url, expected, out, index, demoName, defaultName, headline, shownValue, openPage, upload, assert, assertEqual } from './helpers.mjs';

const check = checks('solution', import.meta.url);

const badDir = new URL('../../bad-inputs/', import.meta.url).pathname;

await check('opens with the default demo model solved, equal to `burnin solve`', async (page) => {
  const v = await openPage(page);
  assertEqual(v.data, expected[index.default], 'optimal value (all bits)');
  assertEqual(v.text, headline(expected[index.default]), 'optimal value as shown');
  assert(await page.locator('#value-wrap tbody tr').count() >= 2, 'V* table drawn');
  await page.screenshot({ path: join(out, 'solution.png'), fullPage: true });
});

await check('every demo model shows the same optimal value as `burnin solve`', async (page) => {
  await openPage(page);
  for (const file of index.models) {
    await page.selectOption('#demo-select', file);
    const v = await shownValue(page, await demoName(file));
    assertEqual(v.data, expected[file], `${file} optimal value`);
  }
});

// Regression: a demo chosen while the previous one was still loading could be
// overwritten by it when the two loads finished out of order (seen in CI).
await check('a demo model chosen while another is loading wins over it', async (page) => {
  await openPage(page);
  const [slow, last] = [index.models[1], index.models[2]];
  // The first choice's file arrives late, after the second choice is shown.
  let release;
  const held = new Promise((r) => { release = r; });
  await page.route(`**/demo-models/${slow}`, async (route) => { await held; await route.continue(); });
  await page.selectOption('#demo-select', slow);
  await page.selectOption('#demo-select', last);
  const v = await shownValue(page, await demoName(last));
  assertEqual(v.data, expected[last], `${last} optimal value`);
  const arrived = page.waitForEvent('requestfinished', (r) => r.url().endsWith(`/demo-models/${slow}`));
  release();
  await arrived;
  // Time for the late file to be solved and shown, if the page were to show it.
  await page.waitForTimeout(300);
  assertEqual(await page.locator('[data-fact="name"]').textContent(), await demoName(last), 'model shown after the late file arrived');
  assertEqual(await page.locator('#demo-select').inputValue(), last, 'demo chooser');
});

await check('the step slider shows Q* and gaps of the chosen step', async (page) => {
  await openPage(page);
  await page.locator('#step').fill('3');
  assertEqual(await page.locator('#step-shown').textContent(), '3', 'step heading');
  assertEqual(await page.locator('#q-wrap td.best').count(), await page.locator('#q-wrap tbody tr').count(), 'one optimal action outlined per state');
});

await check('the tabs are reachable from the keyboard', async (page) => {
  await openPage(page);
  await page.focus('#tab-solution');
  for (const tab of ['editor', 'graph', 'experiment']) {
    await page.keyboard.press('ArrowRight');
    assertEqual(await page.locator(`#tab-${tab}`).getAttribute('aria-selected'), 'true', `${tab} tab selected`);
    assert(await page.locator(`#panel-${tab}`).isVisible(), `${tab} panel shown`);
    assertEqual(await page.evaluate(() => document.activeElement.id), `tab-${tab}`, 'focus follows');
  }
  // Every control on the page has an accessible name.
  const unnamed = await page.evaluate(() => [...document.querySelectorAll('input, select, button')]
    .filter((e) => !e.hidden && e.type !== 'hidden' && e.type !== 'file')
    .filter((e) => !(e.labels && e.labels.length) && !e.getAttribute('aria-label') && !e.getAttribute('aria-labelledby') && !e.textContent.trim())
    .map((e) => e.id || e.outerHTML.slice(0, 60)));
  assertEqual(unnamed.join(', '), '', 'controls without a name');
});

await check('a bad file shows its problems and changes nothing open or saved', async (page) => {
  const before = await openPage(page);
  await page.click('#tab-library');
  await page.click('#save-current');
  const saved = await page.locator('#library-list li').count();
  const bad = JSON.stringify({
    format: 'burnin-model', version: 1, horizon: 2, states: ['a', 'b'], actions: ['x'], start: [1, 0],
    steps: [{ transitions: [[[[0, 0.97]]], [[[1, 1]]]], rewards: [[0.5], [0]] }],
  });
  await upload(page, 'broken.json', bad);
  await page.waitForSelector('#problems:not([hidden])');
  const items = await page.locator('#problems li').allTextContents();
  assertEqual(items[0], 'steps[0].transitions[0][0]: probabilities sum to 0.9700, expected 1', 'first problem');
  assertEqual((await shownValue(page, defaultName)).data, before.data, 'the open model is unchanged');
  await page.click('#tab-library');
  assertEqual(await page.locator('#library-list li').count(), saved, 'the library is unchanged');
});

await check('markup in a name or label shows as plain text', async (page) => {
  await openPage(page);
  const name = '<img src=x onerror="window.__injected = 1">';
  const model = JSON.stringify({
    format: 'burnin-model', version: 1, name, horizon: 1, states: ['<b>bold</b>'], actions: ['<i>go</i>'],
    start: [1], steps: [{ transitions: [[[[0, 1]]]], rewards: [[0.5]] }],
  });
  await upload(page, 'markup.json', model);
  assertEqual((await shownValue(page, name)).data, 0.5, 'optimal value');
  assertEqual(await page.locator('#value-wrap tbody th').first().textContent(), '<b>bold</b>', 'state label');
  await page.click('#tab-library');
  await page.click('#save-current');
  assertEqual(await page.locator('#library-list .entry-name').first().textContent(), name, 'library name');
  assertEqual(await page.locator('main img, main b, main i').count(), 0, 'no element made from file text');
  assertEqual(await page.evaluate(() => window.__injected), undefined, 'no script ran');
});

await check('a generated model opens solved', async (page) => {
  await openPage(page);
  await page.click('#generator summary');
  await page.selectOption('#gen-kind', 'lock');
  await page.fill('#gen-horizon', '4');
  await page.fill('#gen-actions', '3');
  await page.click('#gen-run');
  // A lock pays 1 to the right code (derived by hand).
  assertEqual((await shownValue(page, 'Combination lock H=4 A=3')).data, 1, 'optimal value');
  await page.fill('#gen-actions', '1');
  await page.click('#gen-run');
  await page.waitForSelector('#problems:not([hidden])');
  assertEqual((await page.locator('#problems li').allTextContents())[0], 'generator.actions: 1 is outside 2..=100', 'bad parameter named');
});

await check('a file dropped on the page opens', async (page) => {
  await openPage(page);
  const text = await (await fetch(`${url}/demo-models/pearl-reef.json`)).text();
  const dt = await page.evaluateHandle((t) => {
    const d = new DataTransfer();
    d.items.add(new File([t], 'dropped.json', { type: 'application/json' }));
    return d;
  }, text);
  await page.dispatchEvent('body', 'dragover', { dataTransfer: dt });
  await page.dispatchEvent('body', 'drop', { dataTransfer: dt });
  assertEqual((await shownValue(page, 'Pearl reef')).data, expected['pearl-reef.json'], 'dropped model solved');
  // The demo selector no longer names a demo: it says what is open.
  assertEqual(await page.locator('#demo-select').evaluate((s) => s.selectedOptions[0].textContent), '— dropped.json is open', 'demo selector');
});

await check('a model at the size limit solves without freezing the page', async (page) => {
  await openPage(page);
  await page.evaluate(() => {
    window.__long = [];
    new PerformanceObserver((list) => { for (const e of list.getEntries()) window.__long.push(e.duration); }).observe({ type: 'longtask' });
  });
  // H·S·A = 1024·4096·4 = 16 777 216 cells: exactly the limit (docs/formats.md).
  await page.click('#generator summary');
  await page.selectOption('#gen-kind', 'random');
  await page.fill('#gen-states', '4096');
  await page.fill('#gen-actions', '4');
  await page.fill('#gen-successors', '1');
  await page.fill('#gen-horizon', '1024');
  await page.click('#gen-run');
  await shownValue(page, 'Random sparse S=4096 A=4 b=1 H=1024');
  assert((await page.locator('#value-wrap .note-row').textContent()).startsWith('Showing 50 of 4096 states'), 'the table says it is cut');
  const worst = Math.max(0, ...(await page.evaluate(() => window.__long)));
  console.log(`     longest main-thread task ${worst.toFixed(0)} ms`);
  // A freeze check, not a speed target: before the fix this was over 1 000 ms.
  assert(worst <= 500, `the page froze for ${worst} ms`);
  await page.fill('#gen-horizon', '1025');
  await page.click('#gen-run');
  await page.waitForSelector('#problems:not([hidden])');
  assertEqual((await page.locator('#problems li').allTextContents())[0], 'generator.states: H·S·A = 1025·4096·4 = 16793600 is over the limit of 16777216 (step, state, action) cells', 'one over the limit');
});

await check('every bad file of the corpus shows its problems in the page and changes nothing', async (page) => {
  const { readdirSync } = await import('node:fs');
  const before = await openPage(page);
  await page.click('#tab-library');
  await page.click('#save-current');
  const saved = await page.locator('#library-list li').count();
  await page.click('#tab-solution');
  // Two files are about giving one kind of file for another; the page opens
  // by "format", so they are not errors here.
  const skip = new Set(['model-experiment-format.json', 'experiment-model-file-given.json']);
  let n = 0;
  // Shards are merged by `burnin merge`, whose messages name the file; the
  // page says what a shard is (checked below).
  for (const name of readdirSync(badDir).filter((f) => f.endsWith('.json') && !skip.has(f) && !f.startsWith('shard-')).sort()) {
    const want = readFileSync(join(badDir, name.replace(/\.json$/, '.expected')), 'utf8').split('\n')[0];
    await upload(page, name, readFileSync(join(badDir, name), 'utf8'));
    await page.waitForFunction((f) => document.querySelector('#problems .problems-lead').textContent.startsWith(`${f}:`) && !document.getElementById('problems').hidden, name, { timeout: 10000 });
    assertEqual((await page.locator('#problems li').allTextContents())[0], want, name);
    n++;
  }
  assert(n >= 40, `checked ${n} files`);
  await upload(page, 'shard-version-1.json', readFileSync(join(badDir, 'shard-version-1.json'), 'utf8'));
  await page.waitForFunction(() => document.querySelector('#problems .problems-lead').textContent.startsWith('shard-version-1.json:'), null, { timeout: 10000 });
  assertEqual((await page.locator('#problems li').allTextContents())[0],
    'format: expected "burnin-model", found "burnin-shard" (this is a shard of an experiment\'s runs: merge the shards with `burnin merge`)', 'a shard file');
  assertEqual((await shownValue(page, defaultName)).data, before.data, 'the open model is unchanged');
  await page.click('#tab-library');
  assertEqual(await page.locator('#library-list li').count(), saved, 'the library is unchanged');
});
