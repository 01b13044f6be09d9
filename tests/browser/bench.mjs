// Opens www/bench.html in headless Chromium and prints the wasm figures.
// Run by `cargo xtask bench` with BURNIN_URL, BURNIN_CHROMIUM and BURNIN_QUICK;
// BURNIN_ONLY=<algorithm key> runs only that learner's workload.
import { chromium } from 'playwright-core';

const browser = await chromium.launch({
  executablePath: process.env.BURNIN_CHROMIUM || '/usr/bin/chromium',
  args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
    '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});
const page = await browser.newPage();
page.on('pageerror', (e) => { console.error(e.message); process.exit(1); });
const query = new URLSearchParams();
if (process.env.BURNIN_QUICK) query.set('quick', '');
if (process.env.BURNIN_ONLY) query.set('only', process.env.BURNIN_ONLY);
await page.goto(`${process.env.BURNIN_URL}/bench.html?${query}`);
await page.waitForSelector('#out[data-done]', { timeout: 3_000_000 });
if ((await page.getAttribute('#out', 'data-done')) !== 'ok') { console.error(await page.textContent('#out')); process.exit(1); }
process.stdout.write(await page.textContent('#out'));
await browser.close();
