// Browser checks of the experiment set-up and running it: equal to `burnin run`, estimates, progress, cancel, workers.
// Run by check.mjs; shared helpers in helpers.mjs.

import { join } from 'node:path';
import { checks, url, out, shownValue, openPage, upload, startRun, runAndWait, downloadText, resultsJson, ferry, ferryCli, assert, assertEqual } from './helpers.mjs';

const check = checks('experiment', import.meta.url);

await check('an experiment run in the page gives the same regret as `burnin run`', async (page) => {
  await openPage(page);
  await upload(page, 'ferry-experiment.json', ferry);
  await page.waitForSelector('#panel-experiment:not([hidden])');
  assertEqual(await page.inputValue('#exp-episodes'), '1500', 'episodes from the file');
  await runAndWait(page);
  const shown = await page.locator('#results-table tbody td[data-value]').evaluateAll((tds) => tds.map((t) => Number(t.dataset.value)));
  assertEqual(shown.length, ferryCli.learners.length, 'one row per learner');
  ferryCli.learners.forEach((l, i) => assertEqual(shown[i], l.regret_mean[l.regret_mean.length - 1], `${l.label}: regret at K (all bits)`));
  // The burn-in cell is the core's reading of the same runs (the number
  // `burnin run --json` wrote, or "not settled"), with how many seeds settled.
  const cells = await page.locator('#results-table tbody tr').evaluateAll((trs) => trs.map((tr) => [...tr.cells].map((c) => c.textContent)));
  ferryCli.learners.forEach((l, i) => {
    const b = cells[i][4];
    assert(l.burn_in === null ? b.startsWith('not settled') : b.startsWith(`${l.burn_in} [`), `${l.label}: burn-in cell "${b}" against ${l.burn_in}`);
    if (l.seeds_linear_at_k > 0) assert(b.includes(`${l.seeds_linear_at_k} of ${l.burn_in_by_seed.length} seeds still linear at K`), `${l.label}: ${b}`);
  });
  // The chart is drawn: the canvas holds many colours.
  const colours = await page.evaluate(() => {
    const c = document.getElementById('chart');
    const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
    const seen = new Set();
    for (let i = 0; i < d.length; i += 16) seen.add((d[i] << 16) | (d[i + 1] << 8) | d[i + 2]);
    return seen.size;
  });
  assert(colours > 20, `chart drawn (${colours} colours)`);
  const box = await page.locator('#chart').boundingBox();
  await page.mouse.move(box.x + box.width * 0.5, box.y + box.height * 0.5);
  await page.waitForSelector('#chart-tip:not([hidden])');
  const tip = await page.locator('#chart-tip').textContent();
  assert(/^k = [\d,]+\n/.test(tip) && tip.includes(ferryCli.learners[0].label), `hover read-out: ${tip}`);
  await page.check('input[name=axes][value=log]');
  await page.check('#show-lower');
  await page.check('#show-bounds');
  await page.screenshot({ path: join(out, 'experiment.png'), fullPage: true });
  await page.selectOption('#chart-view', 'episode');
  assert((await page.locator('#chart-caption').textContent()).length > 0, 'caption');
});

await check('"New seed" writes a fresh base seed into the experiment, and the results carry it', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  const before = await page.inputValue('#exp-seed');
  const draw = async (was) => {
    await page.click('#new-seed');
    await page.waitForFunction((w) => document.getElementById('exp-seed').value !== w, was);
    return page.inputValue('#exp-seed');
  };
  const a = await draw(before);
  const b = await draw(a);
  for (const s of [a, b]) assert(/^\d+$/.test(s) && Number(s) >= 1 && Number(s) <= 999999999, `a seed of up to nine digits: ${s}`);
  // Two draws from 10⁹ seeds coincide with probability 10⁻⁹.
  assert(a !== b, `two fresh seeds differ (${a}, ${b})`);
  await page.fill('#exp-episodes', '200');
  await runAndWait(page);
  const r = await resultsJson(page);
  assertEqual(String(r.seed), b, 'the results carry the seed that was drawn');
});

await check('the main thread never blocks for more than 50 ms during a run and while its charts are drawn', async (page) => {
  await openPage(page);
  await page.evaluate(() => {
    window.__long = [];
    new PerformanceObserver((list) => { for (const e of list.getEntries()) window.__long.push(e.duration); }).observe({ type: 'longtask', buffered: false });
  });
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '20000');
  await page.evaluate(() => { window.__long = []; });
  await runAndWait(page);
  // Drawing included: the core draws every chart on this thread.
  await page.waitForFunction(() => Number(document.getElementById('chart').dataset.series) > 0);
  await page.check('input[name=axes][value=log]');
  await page.check('#show-lower');
  await page.check('#show-bounds');
  await page.selectOption('#chart-view', 'episode');
  await page.selectOption('#chart-view', 'cumulative');
  await page.setViewportSize({ width: 1100, height: 800 });
  await downloadText(page, '#export-svg');
  await Promise.all([page.waitForEvent('download'), page.click('#export-png')]);
  await page.click('#present');
  await page.click('#present-close');
  const long = await page.evaluate(() => window.__long);
  const worst = Math.max(0, ...long);
  console.log(`     ${long.length} long tasks, the longest ${worst.toFixed(0)} ms`);
  assert(worst <= 50, `the main thread blocked for ${worst} ms`);
});

await check('the time left is estimated from each learner\'s own measured cost, not the overall rate', async (page) => {
  await openPage(page);
  const r = await page.evaluate(async () => {
    const { timeLeft } = await import('./eta.js');
    // A fast learner done (1000 episodes in 10 ms), a slow one a tenth done
    // at 1 ms an episode: the slow one's 9000 episodes left take 9 s; the
    // overall rate (2000 episodes in 1.01 s) would have said under 5 s.
    const a = timeLeft([1000, 10000], [{ episodes: 1000, ms: 10 }, { episodes: 1000, ms: 1000 }], 1);
    // Two workers share the work; a learner not yet started is counted at
    // the slowest rate seen, and the estimate says "at least".
    const b = timeLeft([1000, 10000, 4000], [{ episodes: 1000, ms: 10 }, { episodes: 1000, ms: 1000 }], 2);
    const c = timeLeft([10], [], 1);
    return { a, b, c };
  });
  assertEqual(r.a.seconds, 9, 'the slow learner\'s own rate');
  assertEqual(r.a.atLeast, false, 'everything measured');
  assertEqual(r.b.seconds, (9000 + 4000) / 1000 / 2, 'the unmeasured learner at the slowest rate, over two workers');
  assertEqual(r.b.atLeast, true, 'says "at least"');
  assertEqual(r.c.seconds, null, 'nothing measured: no number');
  // During a run the status line gives it.
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '100000000');
  await startRun(page);
  await page.waitForFunction(() => / s left · /.test(document.getElementById('exp-status').textContent), null, { timeout: 20000 });
  await page.click('#cancel-exp');
  await page.waitForFunction(() => /^Cancelled/.test(document.getElementById('exp-status').textContent));
});

await check('a run estimated at more than a few minutes asks first and says how long; a short one starts at once', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '1000000000');
  await page.click('#run-exp');
  await page.waitForFunction(() => document.getElementById('long-run').open, null, { timeout: 20000 });
  const asked = await page.textContent('#long-run-text');
  assert(/^It is estimated to take (about|at least) [\d.]+ (min|h \d+ min|days|years) on \d+ workers?, peak memory about [\d.]+ (kB|MB|GB)\.$/.test(asked), asked);
  await page.click('#long-run-back');
  const status = await page.textContent('#exp-status');
  assert(status.startsWith('Not started: estimated '), status);
  assert(await page.isEnabled('#run-exp'), 'nothing runs');
  assert(await page.isDisabled('#cancel-exp'), 'nothing to cancel');
  assertEqual(await page.inputValue('#exp-episodes'), '1000000000', 'the set-up is kept');
  // The estimate is the core's own, the same as `burnin run --estimate`
  // gives (its per-episode costs are timed, so compare the arithmetic: a
  // billion episodes at the measured cost).
  const est = await page.evaluate(async () => {
    const { estimateRun } = await import('./compute.js');
    const text = JSON.stringify({ format: 'burnin-experiment', version: 1, episodes: 1000000, seeds: 2, generator: { kind: 'river', states: 4, horizon: 5 }, learners: [{ algorithm: 'uniform' }] });
    return (await estimateRun(text, 1)).estimate;
  });
  const perEpisode = est.learners[0].seconds_per_episode;
  assert(perEpisode > 0, `a measured cost: ${perEpisode}`);
  assert(Math.abs(est.seconds - 2 * 1e6 * perEpisode) <= 1e-9 * est.seconds, `${est.seconds} = 2 runs × 10⁶ episodes × ${perEpisode}`);
  // A short run starts without asking.
  await page.fill('#exp-episodes', '200');
  assertEqual(await startRun(page), '', 'no question for a short run');
  await page.waitForFunction(() => /^Done in/.test(document.getElementById('exp-status').textContent), null, { timeout: 60000 });
});

await check('a long run cancels within a quarter second', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '100000000');
  await startRun(page);
  await page.waitForFunction(() => Number(document.getElementById('exp-progress').value) > 0, null, { timeout: 20000 });
  await page.click('#cancel-exp');
  await page.waitForFunction(() => /^Cancelled/.test(document.getElementById('exp-status').textContent), null, { timeout: 5000 });
  // Measured in the page: from the click to the worker's answer.
  const ms = Number(await page.locator('#exp-status').getAttribute('data-cancel-ms'));
  console.log(`     cancel acknowledged ${ms} ms after the click`);
  assert(ms < 250, `cancel took ${ms} ms`);
  assert(await page.isEnabled('#run-exp'), 'the page is usable again');
  await page.fill('#exp-episodes', '200');
  await runAndWait(page);
});

await check('a learner row\'s label follows its algorithm and parameter unless typed; the row says what its parameter is and offers only what can run', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  const row = (i) => page.locator(`#learner-rows tr:nth-child(${i})`);
  // Row 2 came as "MVP ×0.002": made a Bernstein UCBVI, it must not keep that name.
  assertEqual(await row(2).locator('input[type=text]').inputValue(), 'MVP ×0.002', 'the preset label');
  await row(2).locator('select').selectOption('ucbvi-bernstein');
  assertEqual(await row(2).locator('input[type=text]').inputValue(), '', 'the label goes back to the default');
  assertEqual(await row(2).locator('.param-name').textContent(), 'bonus scale', 'the parameter is named');
  // A label typed here is kept, and flagged when the row changes under it.
  await row(3).locator('input[type=text]').fill('my Bernstein');
  await row(3).locator('input[type=number]').fill('0.5');
  assert(await row(3).locator('input[type=text]').evaluate((e) => e.classList.contains('stale') && e.value === 'my Bernstein'), 'typed label kept and flagged');
  // Uniform has no parameter: none is shown.
  assert(await row(7).locator('input[type=number]').isHidden(), 'no parameter box for uniform');
  assertEqual(await row(7).locator('.param-name').textContent(), 'no parameter', 'and it says so');
  // A bandit-only learner is not offered on an MDP, and says why.
  const ucb1 = await row(1).locator('select option[value=ucb1]').evaluate((o) => ({ disabled: o.disabled, text: o.textContent }));
  assert(ucb1.disabled && /bandits only/.test(ucb1.text), `UCB1 on an MDP: ${JSON.stringify(ucb1)}`);
  await page.fill('#exp-episodes', '200');
  await runAndWait(page);
  const labels = await page.locator('#results-table tbody th').allTextContents();
  assert(labels.some((l) => /^ucbvi-bernstein/.test(l)) && !labels.includes('MVP ×0.002'), `the table names what ran: ${labels}`);
});

await check('the set-up is locked while a run goes, and a problem\'s message goes once it is fixed', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  await page.locator('#learner-rows tr:nth-child(3) input[type=text]').fill('same');
  await page.locator('#learner-rows tr:nth-child(4) input[type=text]').fill('same');
  await startRun(page);
  await page.waitForSelector('#exp-problems:not([hidden])');
  assert((await page.locator('#exp-problems').textContent()).includes('duplicate label'), 'the problem is shown');
  await page.locator('#learner-rows tr:nth-child(4) input[type=text]').fill('different');
  await page.waitForSelector('#exp-problems[hidden]', { state: 'attached', timeout: 5000 });
  await page.fill('#exp-episodes', '100000000');
  await startRun(page);
  await page.waitForFunction(() => Number(document.getElementById('exp-progress').value) > 0, null, { timeout: 20000 });
  assert(await page.locator('#exp-episodes').isDisabled(), 'episodes locked');
  assert(await page.locator('#learner-rows select').first().isDisabled(), 'learners locked');
  await page.click('#cancel-exp');
  await page.waitForFunction(() => /^Cancelled/.test(document.getElementById('exp-status').textContent));
  assert(await page.locator('#exp-episodes').isEnabled(), 'unlocked after the run');
});

await check('the generator form and the sweep list come from the core\'s catalogue, and any generator parameter can be swept', async (page) => {
  await openPage(page);
  await page.click('#generator summary');
  // Every parameter of the catalogue, optional ones left to the seed.
  await page.selectOption('#gen-kind', 'lower-bound');
  for (const p of ['actions', 'depth', 'horizon', 'wait_until', 'epsilon', 'special_step', 'special_leaf', 'special_action', 'seed']) {
    assert(await page.locator(`#gen-${p}`).count() === 1, `field ${p}`);
  }
  assertEqual(await page.locator('#gen-special_step').getAttribute('placeholder'), 'from the seed', 'optional parameter');
  await page.selectOption('#gen-kind', 'drift-grid');
  // The drift grid's start and goal are computed from the board when left empty, not drawn.
  for (const p of ['start_column', 'start_row', 'goal_column', 'goal_row']) assertEqual(await page.locator(`#gen-${p}`).getAttribute('placeholder'), 'default', `${p} has a default of its own`);
  await page.fill('#gen-width', '3');
  await page.fill('#gen-height', '2');
  await page.fill('#gen-horizon', '6');
  await page.click('#gen-run');
  await shownValue(page, 'Drift grid 3×2 H=6');
  await page.click('#tab-experiment');
  const keys = await page.locator('#sweep-param option').evaluateAll((os) => os.map((o) => o.value));
  for (const k of ['delta', 'bonus_scale', 'epsilon', 'prior', 'width', 'height', 'slip', 'horizon', 'goal_reward', 'start_column', 'start_row', 'goal_column', 'goal_row']) assert(keys.includes(k), `sweep offers ${k}: ${keys}`);
  await page.fill('#exp-episodes', '200');
  await page.fill('#exp-seeds', '2');
  const rows = page.locator('#learner-rows tr');
  for (let i = 1; i < await rows.count(); i++) await rows.nth(i).locator('input[type=checkbox]:not(.swept)').uncheck();
  await page.selectOption('#sweep-param', 'slip');
  await page.fill('#sweep-values', '0, 0.3');
  await runAndWait(page);
  assertEqual(await page.locator('#chart-view option').first().textContent(), 'regret at K against slip', 'sweep view');
  assertEqual(await page.locator('#results-table thead th').allTextContents().then((t) => t.slice(1).join('|')), 'slip = 0|slip = 0.3', 'sweep table');
});

await check('the theory-constant demo experiment opens with its model and set-up', async (page) => {
  await openPage(page);
  const want = await (await fetch(`${url}/demo-models/experiments/porch-lantern-theory.json`)).json();
  await page.selectOption('#demo-select', 'experiments/porch-lantern-theory.json');
  await shownValue(page, want.model.name);
  assertEqual(await page.inputValue('#exp-episodes'), String(want.episodes), 'episodes');
  assertEqual(await page.inputValue('#exp-seeds'), String(want.seeds), 'seeds');
  const labels = await page.locator('#learner-rows input[aria-label=label]').evaluateAll((xs) => xs.map((x) => x.value));
  assertEqual(labels.join('|'), want.learners.map((l) => l.label).join('|'), 'learners');
});

await check('a worker that crashes mid-run is reported and replaced', async (page) => {
  // The fault is injected by message, so the page's own error path is what is tested.
  const others = [];
  page.removeAllListeners('console');
  page.on('console', (m) => { if (m.type() === 'error' && !m.text().includes('injected fault')) others.push(m.text()); });
  await openPage(page);
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '100000000');
  await startRun(page);
  await page.waitForFunction(() => Number(document.getElementById('exp-progress').value) > 0, null, { timeout: 20000 });
  await page.evaluate(async () => (await import('./compute.js')).crashPoolWorkerForTest(0));
  await page.waitForFunction(() => /^The run failed: a compute worker stopped/.test(document.getElementById('exp-status').textContent), null, { timeout: 10000 });
  assert((await page.locator('#notice').textContent()).includes('was replaced'), 'the page says the worker was replaced');
  // The page is usable: a new run works on the replaced worker.
  await page.fill('#exp-episodes', '300');
  await page.waitForFunction(() => !document.getElementById('run-exp').disabled);
  await runAndWait(page);
  assertEqual(others.join('\n'), '', 'no other console errors');
});
