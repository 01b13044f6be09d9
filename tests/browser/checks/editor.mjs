// Browser checks of the editor.
// Run by check.mjs; shared helpers in helpers.mjs.

import { join } from 'node:path';
import { checks, url, out, index, defaultName, shownValue, openPage, dropFile, assert, assertEqual } from './helpers.mjs';

const check = checks('editor', import.meta.url);

await check('the editor shows a problem at its cell as you type, and uses the fixed model', async (page) => {
  await openPage(page);
  await page.selectOption('#demo-select', 'seed-trial.json');
  await shownValue(page, 'Seed trial');
  await page.click('#tab-editor');
  const row = page.locator('#ed-grid tbody tr').nth(2);
  await row.locator('td input[type=number]').first().fill('0.8');
  await page.waitForFunction(() => document.querySelectorAll('#ed-grid .row-check')[2].textContent !== '');
  assertEqual(await row.locator('.row-check').textContent(), 'probabilities sum to 0.8000, expected 1', 'message at the row');
  assertEqual(await row.locator('.row-check').getAttribute('aria-invalid'), 'true', 'row marked');
  assert(await page.isDisabled('#ed-apply'), 'a broken model cannot be used');
  await row.locator('td input[type=number]').first().fill('1');
  const reward = row.locator('.reward-input');
  await reward.fill('bernoulli 1.5');
  await page.waitForFunction(() => document.querySelectorAll('#ed-grid .reward-input')[2].getAttribute('aria-invalid') === 'true');
  assertEqual(await reward.getAttribute('title'), 'expected a probability in [0, 1], found 1.5', 'reward message');
  await reward.fill('0.9');
  await page.waitForFunction(() => !document.getElementById('ed-apply').disabled);
  // The open model is untouched until the edit is used.
  assertEqual((await shownValue(page, 'Seed trial')).data, 0.55, 'unchanged until used');
  await page.click('#ed-apply');
  // derived by hand: the best arm now pays 0.9 for sure.
  await page.waitForFunction(() => document.getElementById('optimal-value').dataset.value === '0.9');
  await page.selectOption('#demo-select', 'tide-pool-forager.json');
  await shownValue(page, defaultName);
  await page.click('#tab-editor');
  await page.fill('#ed-horizon', '0');
  await page.waitForFunction(() => document.getElementById('ed-horizon').getAttribute('aria-invalid') === 'true');
  await page.screenshot({ path: join(out, 'editor.png'), fullPage: true });
});

await check('the editor takes normal edits: typed thirds, row tools, problems named by state and action, undo after use', async (page) => {
  const v = await openPage(page);
  await page.click('#tab-editor');
  const row = page.locator('#ed-grid tbody tr').first();
  const cells = row.locator('td input[type=number]');
  const n = await cells.count();
  const valid = () => page.waitForFunction(() => /^Valid/.test(document.getElementById('ed-summary').textContent), null, { timeout: 5000 });
  // Thirds as a person types them (the format accepts sums within 10⁻⁶).
  for (let t = 0; t < n; t++) await cells.nth(t).fill(t < 3 ? '0.333333' : '');
  await valid();
  // A wrong sum is named by the row's state and action, not a JSON path.
  await cells.nth(0).fill('0.9');
  await page.waitForFunction(() => document.getElementById('ed-problems').children.length > 0);
  const said = await page.locator('#ed-problems li').first().textContent();
  const model = await (await fetch(`${url}/demo-models/${index.default}`)).json();
  assert(said.startsWith(`${model.stationary === false ? 'step 1' : 'every step'}, row "${model.states[0]}", "${model.actions[0]}": probabilities sum to`), `in words: ${said}`);
  await row.getByRole('button', { name: 'normalise' }).click();
  await valid();
  // "Remainder here" fills the cell edited last with what the others leave.
  await cells.nth(0).fill('0.25');
  await cells.nth(1).focus();
  await row.getByRole('button', { name: 'remainder here' }).click();
  await valid();
  const values = await cells.evaluateAll((xs) => xs.map((x) => Number(x.value || 0)));
  assert(Math.abs(values.reduce((a, b) => a + b, 0) - 1) < 1e-12 && values[0] === 0.25, `the row sums to 1: ${values}`);
  // Use it, then take it back.
  await page.click('#ed-apply');
  await page.waitForSelector('#undo-box:not([hidden])');
  await page.click('#undo-use');
  await page.waitForFunction(() => /as it was before your edits/.test(document.getElementById('notice').textContent));
  assertEqual((await shownValue(page, defaultName)).data, v.data, 'the model before the edits is back');
});

// Regression: the page read `stationary` itself and took a missing key for
// true, so a time-dependent file without it showed only its first step;
// the core reads it as time-dependent (docs/formats.md: the default follows
// the number of step tables).
await check('a time-dependent file without "stationary" shows every step in the editor and the graph', async (page) => {
  await openPage(page);
  const doc = await (await fetch(`${url}/demo-models/night-ferry.json`)).json();
  delete doc.stationary;
  await dropFile(page, 'no-stationary.json', JSON.stringify(doc));
  await shownValue(page, doc.name);
  assertEqual(await page.locator('[data-fact="kind"]').textContent(), 'time-dependent (one table per step)', 'facts');
  await page.click('#tab-editor');
  assertEqual(await page.locator('#ed-step option').count(), doc.horizon, 'editor tables');
  assert(!(await page.locator('#ed-stationary').isChecked()), 'editor says time-dependent');
  await page.click('#tab-graph');
  assertEqual(await page.locator('#graph-step').getAttribute('max'), String(doc.horizon), 'graph steps');
  assert(!(await page.locator('#graph-step').isDisabled()), 'graph step slider enabled');
});
