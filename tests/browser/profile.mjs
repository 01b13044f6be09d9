// Where the wasm core spends its time on one learning workload, in
// headless Chromium: runs the workload once to let the engine optimise it,
// then again under V8's sampling profiler, and prints the share of samples
// in each function (self time). A developer's tool, not a test.
//
//   BURNIN_URL=http://127.0.0.1:8000 ONLY=ucbvi-hoeffding node tests/browser/profile.mjs
//
// BURNIN_URL serves www/ (`cargo xtask serve`); ONLY is an algorithm key;
// BURNIN_CHROMIUM overrides /usr/bin/chromium.
import { chromium } from 'playwright-core';

const only = process.env.ONLY;
if (!process.env.BURNIN_URL || !only) {
  console.error('usage: BURNIN_URL=<served www/> ONLY=<algorithm key> node profile.mjs');
  process.exit(2);
}
const browser = await chromium.launch({
  executablePath: process.env.BURNIN_CHROMIUM || '/usr/bin/chromium',
  args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
    '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});
const page = await browser.newPage();
await page.goto(`${process.env.BURNIN_URL}/bench.html?only=none`);
const cdp = await page.context().newCDPSession(page);
await cdp.send('Profiler.enable');
await cdp.send('Profiler.setSamplingInterval', { interval: 200 });
await page.evaluate(async () => { const m = await import('./pkg/burnin.js'); await m.default(); window.core = m; });
await page.evaluate((key) => window.core.benchFigures(true, key, false, false), only);
await cdp.send('Profiler.start');
const out = JSON.parse(await page.evaluate((key) => window.core.benchFigures(true, key, false, false), only));
const { profile } = await cdp.send('Profiler.stop');
await browser.close();

const nodes = new Map(profile.nodes.map((n) => [n.id, n]));
const self = new Map();
for (const id of profile.samples) {
  const f = nodes.get(id).callFrame;
  const name = f.functionName || f.url || '(anonymous)';
  self.set(name, (self.get(name) || 0) + 1);
}
for (const f of out.figures) console.log(`${f.name}: ${Math.round(f.best)} ${f.unit}`);
const total = profile.samples.length;
for (const [name, n] of [...self].sort((a, b) => b[1] - a[1]).slice(0, 15)) {
  console.log(`${(100 * n / total).toFixed(1).padStart(5)}%  ${name.slice(0, 110)}`);
}
