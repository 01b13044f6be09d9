// Browser checks of the transition graph.
// Run by check.mjs; shared helpers in helpers.mjs.

import { join } from 'node:path';
import { checks, url, out, shownValue, openPage, downloadText, assert, assertEqual } from './helpers.mjs';

const check = checks('graph', import.meta.url);

await check('the graph draws every transition, highlights the policy, and keeps dragged positions', async (page) => {
  await openPage(page);
  await page.selectOption('#demo-select', 'pearl-reef.json');
  await shownValue(page, 'Pearl reef');
  await page.click('#tab-graph');
  const m = await (await fetch(`${url}/demo-models/pearl-reef.json`)).json();
  const entries = m.steps[0].transitions.flat().flat().filter((e) => e[1] > 0).length;
  assertEqual(await page.locator('#graph-box path[data-edge]').count(), entries, 'one arrow per transition');
  assertEqual(await page.locator('#graph-legend li').count(), m.actions.length, 'one legend entry per action');
  await page.check('#graph-policy');
  const faded = await page.locator('#graph-box path[data-edge][opacity="0.1"]').count();
  assert(faded > 0 && faded < entries, `non-policy arrows faded (${faded})`);
  const node = page.locator('#graph-box [data-state="3"]');
  const b = await node.boundingBox();
  await page.mouse.move(b.x + b.width / 2, b.y + b.height / 2);
  await page.mouse.down();
  await page.mouse.move(b.x + b.width / 2, b.y + b.height / 2 + 120, { steps: 5 });
  await page.mouse.up();
  await page.locator('#graph-box [data-state="0"]').focus();
  await page.keyboard.press('ArrowUp');
  await page.screenshot({ path: join(out, 'graph.png') });
  const saved = JSON.parse((await downloadText(page, '#save-model')).text);
  assert(saved.layout.positions[3][1] < m.layout.positions[3][1] - 0.1, `dragged down: ${saved.layout.positions[3]} vs ${m.layout.positions[3]}`);
  assert(saved.layout.positions[0][1] > m.layout.positions[0][1], 'moved up with the keyboard');
});
