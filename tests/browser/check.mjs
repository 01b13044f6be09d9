// Browser checks of the Burnin page in Debian's headless Chromium.
// Run by `cargo xtask test`, which serves www/ and passes:
//   BURNIN_URL       the served page
//   BURNIN_CHROMIUM  the Chromium binary
//   BURNIN_EXPECTED  JSON {demo file: optimal_value from `burnin solve --json`}
//   BURNIN_OUT       folder for screenshots
import { chromium } from 'playwright-core';
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';

const url = process.env.BURNIN_URL;
const expected = JSON.parse(process.env.BURNIN_EXPECTED);
const out = process.env.BURNIN_OUT || 'out';
mkdirSync(out, { recursive: true });

const browser = await chromium.launch({
  executablePath: process.env.BURNIN_CHROMIUM || '/usr/bin/chromium',
  args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
    '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});

let passed = 0, failed = 0;
async function check(name, body) {
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, deviceScaleFactor: 1 });
  const page = await context.newPage();
  const problems = [];
  page.on('console', (m) => { if (m.type() === 'error') problems.push(`console error: ${m.text()}`); });
  page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
  page.on('request', (r) => { if (!r.url().startsWith(url) && !r.url().startsWith('data:')) problems.push(`request outside the page: ${r.url()}`); });
  try {
    await body(page);
    if (problems.length) throw new Error(problems.join('\n'));
    passed++;
    console.log(`ok   ${name}`);
  } catch (err) {
    failed++;
    console.log(`FAIL ${name}\n     ${String(err.stack || err).split('\n').join('\n     ')}`);
  } finally {
    await context.close();
  }
}

function assertEqual(got, want, what) {
  if (got !== want) throw new Error(`${what}: got ${JSON.stringify(got)}, expected ${JSON.stringify(want)}`);
}

/** The optimal value once a model whose name matches `name` is on screen. */
async function shownValue(page, name) {
  await page.waitForFunction((n) => {
    const dd = document.querySelector('[data-fact="name"]');
    return dd && dd.textContent === n && document.getElementById('optimal-value').dataset.value;
  }, name, { timeout: 15000 });
  const out = page.locator('#optimal-value');
  return { data: Number(await out.getAttribute('data-value')), text: await out.textContent() };
}

const headline = (x) => x.toFixed(6).replace('-', '−');
const demoName = async (file) => (await (await fetch(`${url}/demo-models/${file}`)).json()).name;

await check('opens with the default demo model solved, equal to `burnin solve`', async (page) => {
  await page.goto(url);
  const index = await (await fetch(`${url}/demo-models/index.json`)).json();
  const v = await shownValue(page, await demoName(index.default));
  assertEqual(v.data, expected[index.default], 'optimal value (all bits)');
  assertEqual(v.text, headline(expected[index.default]), 'optimal value as shown');
  const rows = await page.locator('#value-wrap tbody tr').count();
  if (rows < 2) throw new Error(`V* table has ${rows} rows`);
  await page.screenshot({ path: join(out, 'solution.png'), fullPage: true });
});

await check('every demo model shows the same optimal value as `burnin solve`', async (page) => {
  await page.goto(url);
  const index = await (await fetch(`${url}/demo-models/index.json`)).json();
  await shownValue(page, await demoName(index.default));
  for (const file of index.models) {
    await page.selectOption('#demo-select', file);
    const v = await shownValue(page, await demoName(file));
    assertEqual(v.data, expected[file], `${file} optimal value`);
  }
});

await check('the step slider shows Q* and gaps of the chosen step', async (page) => {
  await page.goto(url);
  const index = await (await fetch(`${url}/demo-models/index.json`)).json();
  await shownValue(page, await demoName(index.default));
  await page.locator('#step').fill('3');
  assertEqual(await page.locator('#step-shown').textContent(), '3', 'step heading');
  const best = await page.locator('#q-wrap td.best').count();
  const states = await page.locator('#q-wrap tbody tr').count();
  assertEqual(best, states, 'one optimal action outlined per state');
});

await check('a bad file shows its problems and keeps the open model', async (page) => {
  await page.goto(url);
  const index = await (await fetch(`${url}/demo-models/index.json`)).json();
  const before = await shownValue(page, await demoName(index.default));
  const bad = JSON.stringify({
    format: 'burnin-model', version: 1, horizon: 2, states: ['a', 'b'], actions: ['x'], start: [1, 0],
    steps: [{ transitions: [[[[0, 0.97]]], [[[1, 1]]]], rewards: [[0.5], [0]] }],
  });
  await page.setInputFiles('#file-input', { name: 'broken.json', mimeType: 'application/json', buffer: Buffer.from(bad) });
  await page.waitForSelector('#problems:not([hidden])');
  const items = await page.locator('#problems li').allTextContents();
  assertEqual(items[0], 'steps[0].transitions[0][0]: probabilities sum to 0.9700, expected 1', 'first problem');
  const after = await shownValue(page, await demoName(index.default));
  assertEqual(after.data, before.data, 'the open model is unchanged');
});

await check('markup in a name or label shows as plain text', async (page) => {
  await page.goto(url);
  const index = await (await fetch(`${url}/demo-models/index.json`)).json();
  await shownValue(page, await demoName(index.default));
  const name = '<img src=x onerror="window.__injected = 1">';
  const model = JSON.stringify({
    format: 'burnin-model', version: 1, name, horizon: 1, states: ['<b>bold</b>'], actions: ['<i>go</i>'],
    start: [1], steps: [{ transitions: [[[[0, 1]]]], rewards: [[0.5]] }],
  });
  await page.setInputFiles('#file-input', { name: 'markup.json', mimeType: 'application/json', buffer: Buffer.from(model) });
  const v = await shownValue(page, name);
  assertEqual(v.data, 0.5, 'optimal value');
  assertEqual(await page.locator('#value-wrap tbody th').first().textContent(), '<b>bold</b>', 'state label');
  assertEqual(await page.locator('img, b, i').count(), 0, 'no element made from file text');
  assertEqual(await page.evaluate(() => window.__injected), undefined, 'no script ran');
});

await browser.close();
console.log(`\nbrowser: ${passed} passed, ${failed} failed`);
process.exit(failed === 0 ? 0 : 1);
