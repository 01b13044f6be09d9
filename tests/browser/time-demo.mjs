// Times a demo experiment run in the page (a measurement for BENCHMARKS.md,
// not a test): serve www/ (`cargo xtask serve`), then
//   BURNIN_URL=http://127.0.0.1:8000 node tests/browser/time-demo.mjs [experiments/FILE]
// prints the seconds from "Run" to the results, with the page's worker pool.
import { chromium } from 'playwright-core';

const url = process.env.BURNIN_URL || 'http://127.0.0.1:8000';
const demo = process.argv[2] || 'experiments/porch-lantern-theory.json';
const browser = await chromium.launch({
  executablePath: process.env.BURNIN_CHROMIUM || '/usr/bin/chromium',
  args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
    '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});
const page = await browser.newPage();
await page.goto(`${url}/`);
await page.waitForFunction(() => document.getElementById('optimal-value').dataset.value, null, { timeout: 30000 });
await page.selectOption('#demo-select', demo);
await page.waitForFunction(() => document.getElementById('exp-episodes').value === '10000000', null, { timeout: 30000 });
const t0 = Date.now();
await page.click('#run-exp');
await page.waitForFunction(() => /^Done in/.test(document.getElementById('exp-status').textContent), null, { timeout: 600000 });
const secs = (Date.now() - t0) / 1000;
const workers = await page.evaluate(() => navigator.hardwareConcurrency);
console.log(JSON.stringify({ demo, seconds: secs, cores: workers, status: await page.locator('#exp-status').textContent() }));
await browser.close();
