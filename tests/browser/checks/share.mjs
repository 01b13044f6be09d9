// Browser checks of share links.
// Run by check.mjs; shared helpers in helpers.mjs.

import { checks, url, demoName, shownValue, openPage, assert, assertEqual } from './helpers.mjs';

const check = checks('share', import.meta.url);

await check('a share link opens the model it carries; a damaged one says so', async (page, context) => {
  await openPage(page);
  await page.selectOption('#demo-select', 'glasshouse-climate.json');
  const v = await shownValue(page, await demoName('glasshouse-climate.json'));
  await page.click('#share-link');
  await page.waitForFunction(() => document.getElementById('share-url').value.includes('#share='));
  const link = await page.inputValue('#share-url');
  // The tab's own address stays clean: a reload reopens the latest work, not the link.
  assertEqual(await page.evaluate(() => location.hash), '', 'the address is not rewritten');
  const other = await context.newPage();
  await other.evaluate(() => localStorage.clear()).catch(() => {});
  await other.goto(link);
  assertEqual((await shownValue(other, await demoName('glasshouse-climate.json'))).data, v.data, 'shared model');
  assertEqual(await other.evaluate(() => location.hash), '', 'an opened link leaves the address');
  // Work done after opening the link survives a reload.
  await other.selectOption('#demo-select', 'night-ferry.json');
  await shownValue(other, await demoName('night-ferry.json'));
  await other.waitForTimeout(300);
  await other.reload();
  await shownValue(other, await demoName('night-ferry.json'));
  const bad = await context.newPage();
  await bad.goto(`${url}/#share=AAAA-not-deflate`);
  await bad.waitForFunction(() => /could not be opened/.test(document.getElementById('notice').textContent));
});

await check('a model too large for a link is refused with a message', async (page) => {
  await openPage(page);
  await page.click('#generator summary');
  await page.selectOption('#gen-kind', 'random');
  await page.fill('#gen-states', '60');
  await page.fill('#gen-actions', '8');
  await page.fill('#gen-successors', '20');
  await page.fill('#gen-horizon', '5');
  await page.check('#gen-time_dependent');
  await page.click('#gen-run');
  await shownValue(page, 'Random sparse S=60 A=8 b=20 H=5');
  const before = await page.evaluate(() => location.hash);
  await page.click('#share-link');
  await page.waitForFunction(() => /too large for a link/.test(document.getElementById('notice').textContent));
  assertEqual(await page.evaluate(() => location.hash), before, 'the address is unchanged');
});

await check('share links are decoded within bounds, and the page allows no eval', async (page) => {
  // The CSP refusals below are logged as console errors; only those are expected.
  const others = [];
  page.removeAllListeners('console');
  page.on('console', (m) => { if (m.type() === 'error' && !/Content Security Policy|Refused to/.test(m.text())) others.push(m.text()); });
  // Longer than any link the page makes: refused before decoding.
  await page.goto(`${url}/#share=${'A'.repeat(70000)}`);
  await page.waitForFunction(() => /longer than any link/.test(document.getElementById('notice').textContent));
  // A small link that inflates past the 4 MiB bound (a "zip bomb").
  const bomb = await page.evaluate(async () => {
    const big = new Uint8Array(8 << 20).fill(32);
    const packed = new Uint8Array(await new Response(new Blob([big]).stream().pipeThrough(new CompressionStream('deflate-raw'))).arrayBuffer());
    let s = '';
    for (const b of packed) s += String.fromCharCode(b);
    return btoa(s).replace(/\+/g, '-').replace(/\//g, '_').replace(/=+$/, '');
  });
  assert(bomb.length < 60000, 'the bomb fits in a link');
  const other = await page.context().newPage();
  await other.goto(`${url}/#share=${bomb}`);
  await other.waitForFunction(() => /holds more than 4194304 bytes/.test(document.getElementById('notice').textContent));
  // The Content-Security-Policy forbids eval and inline script.
  const csp = await page.locator('meta[http-equiv="Content-Security-Policy"]').getAttribute('content');
  assert(/script-src 'self' 'wasm-unsafe-eval';/.test(csp) && !csp.includes("'unsafe-eval'") && !csp.includes("'unsafe-inline'"), `strict CSP: ${csp}`);
  // DevTools evaluation bypasses the CSP, so test what a page script meets:
  // injected inline script and eval from an injected script are refused.
  const refused = await page.evaluate(() => new Promise((resolve) => {
    const seen = [];
    document.addEventListener('securitypolicyviolation', (e) => { seen.push(e.violatedDirective); if (seen.length === 2) resolve(seen.sort()); });
    const inline = document.createElement('script');
    inline.textContent = 'window.__inline = 1';
    document.head.append(inline);
    const fromData = document.createElement('script');
    fromData.src = 'data:text/javascript,window.__data = 1';
    document.head.append(fromData);
    setTimeout(() => resolve(seen.sort()), 2000);
  }));
  assertEqual(refused.join(','), 'script-src-elem,script-src-elem', 'inline and data: scripts refused');
  assertEqual(await page.evaluate(() => [window.__inline, window.__data].join(',')), ',', 'neither ran');
  assertEqual(others.join('\n'), '', 'no other console errors');
});
