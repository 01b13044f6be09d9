// Browser checks of the published site: sub-path, offline, installable, updates.
// Run by check.mjs; shared helpers in helpers.mjs.

import { cpSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { checks, distUrl, distDir, distNext, cliVersion, defaultName, shownValue, startRun, runAndWait, assert, assertEqual } from './helpers.mjs';

const check = checks('site', import.meta.url);

await check('the published site opens from a sub-path, keeps working offline, is installable, and offers a newer build without swapping it under a run', async (page, context) => {
  if (!distUrl) throw new Error('BURNIN_DIST_URL is not set (cargo xtask test sets it)');
  await page.goto(distUrl);
  await shownValue(page, defaultName);
  // The same build identity as `burnin --version`.
  assertEqual(await page.textContent('#build-id'), `Burnin ${cliVersion.replace(/^burnin /, '').trim()}`, 'build identity');
  await page.waitForFunction(() => navigator.serviceWorker.controller !== null, null, { timeout: 20000 });
  // Installable: a valid manifest whose icons load.
  const manifest = await page.evaluate(async () => {
    const href = document.querySelector('link[rel=manifest]').href;
    const m = await (await fetch(href)).json();
    const sizes = [];
    for (const icon of m.icons) {
      const img = new Image();
      img.src = new URL(icon.src, href).href;
      await img.decode();
      sizes.push([icon.type, img.naturalWidth, img.naturalHeight]);
    }
    return { m, sizes };
  });
  assertEqual(manifest.m.start_url, './', 'start_url is relative');
  assertEqual(manifest.m.scope, './', 'scope is relative');
  assertEqual(manifest.m.display, 'standalone', 'opens in its own window');
  assert(manifest.m.name && manifest.m.short_name, 'names');
  assert(manifest.sizes.some(([t, w, h]) => t === 'image/png' && w >= 512 && h >= 512), `a 512 px PNG icon: ${JSON.stringify(manifest.sizes)}`);
  assert(manifest.sizes.every(([, w]) => w > 0), 'every icon loads');
  // A share link made online.
  await page.click('#tab-solution');
  await page.click('#share-link');
  await page.waitForFunction(() => document.getElementById('share-url').value.includes('#share='));
  const link = await page.inputValue('#share-url');
  assert(link.startsWith(distUrl), `the link is under the sub-path: ${link}`);
  // Offline: a reload opens, solves and runs; the share link opens.
  await context.setOffline(true);
  await page.reload();
  await shownValue(page, defaultName);
  await page.goto(link);
  await shownValue(page, defaultName);
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '200');
  await runAndWait(page);
  await context.setOffline(false);
  // A newer build is published over the old one: it is offered, not swapped in.
  cpSync(distNext, distDir, { recursive: true, force: true });
  await page.evaluate(() => { window.__before = 'the old page'; });
  await page.evaluate(async () => (await navigator.serviceWorker.getRegistration()).update());
  await page.waitForSelector('#update-bar:not([hidden])', { timeout: 20000 });
  // During a run, the reload waits.
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '100000000');
  await startRun(page);
  await page.click('#update-reload');
  assert((await page.textContent('#update-text')).includes('after the run'), 'says it waits for the run');
  assertEqual(await page.evaluate(() => window.__before), 'the old page', 'not reloaded under the run');
  await page.click('#cancel-exp');
  await page.waitForFunction(() => /^Cancelled/.test(document.getElementById('exp-status').textContent));
  await Promise.all([page.waitForEvent('load'), page.click('#update-reload')]);
  await shownValue(page, defaultName);
  const next = JSON.parse(readFileSync(join(distNext, 'build.json'), 'utf8'));
  const cacheNames = await page.evaluate(async () => { await navigator.serviceWorker.ready; return caches.keys(); });
  assert(cacheNames.includes(`burnin-${next.version}`), `the new build's cache: ${cacheNames}`);
  assert(!cacheNames.some((k) => k !== `burnin-${next.version}`), `the old cache is gone: ${cacheNames}`);
});
