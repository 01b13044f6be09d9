// Browser checks of the Table 1 comparison (#29, #30, #31): every learner of
// Table 1 of arXiv:2307.13586 in the page's learner table, ORLC's
// certificates beside the exact per-episode regret, and a sweep's scaling
// readings (exponents beside the published orders) in the table and charts.
// Run by check.mjs; shared helpers in helpers.mjs.

import { checks, openPage, upload, runAndWait, downloadText, resultsJson, assert, assertEqual } from './helpers.mjs';

const check = checks('table1', import.meta.url);

await check('every Table 1 learner is offered; an ORLC run draws its certificates beside the exact per-episode regret', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  const offered = await page.locator('#learner-rows select').first().locator('option').evaluateAll((os) => os.map((o) => o.value));
  for (const k of ['mvp', 'mvp-2021', 'ucbvi-hoeffding', 'ucbvi-bernstein', 'euler', 'orlc', 'q-ucb-hoeffding', 'q-ucb-bernstein', 'ucb-advantage', 'q-early-settled', 'psrl', 'rlsvi']) {
    assert(offered.includes(k), `the learner table offers ${k}: ${offered}`);
  }
  const exp = {
    format: 'burnin-experiment', version: 1, name: 'certificates',
    generator: { kind: 'lower-bound', actions: 2, horizon: 10, depth: 1 },
    episodes: 2000, seeds: 2, seed: 3,
    learners: [{ algorithm: 'orlc', bonus_scale: 0.1 }, { algorithm: 'euler', bonus_scale: 0.01 }],
  };
  await upload(page, 'certificates.json', JSON.stringify(exp));
  await page.waitForSelector('#panel-experiment:not([hidden])');
  await runAndWait(page);
  const r = await resultsJson(page);
  const orlc = r.learners[0];
  assertEqual(orlc.certificate_mean.length, orlc.checkpoints.length, 'a certificate per checkpoint');
  assert(r.learners[1].certificate_mean === undefined, 'EULER gives no certificate');
  // Each checkpoint's mean certificate is at least that episode's mean exact
  // regret (the certificate bounds the episode's suboptimality, Dann et al.
  // 2019; it held in every episode of the core's own checks).
  orlc.certificate_mean.forEach((c, i) => assert(c >= orlc.episode_regret_mean[i] - 1e-12, `checkpoint ${i}: ${c} < ${orlc.episode_regret_mean[i]}`));
  const views = await page.locator('#chart-view option').allTextContents();
  assert(views.includes('per-episode regret and certificates'), `views: ${views}`);
  await page.selectOption('#chart-view', 'episode');
  const svg = (await downloadText(page, '#export-svg')).text;
  assert(svg.includes('orlc ×0.1: certificate'), 'the legend names the certificate curve');
  const csv = (await downloadText(page, '#export-csv')).text.split('\n');
  assert(csv[0].endsWith(',certificate_mean'), csv[0]);
});

await check('a sweep over S reads each learner\'s burn-in and regret exponents beside the published orders, in the table and two log-log charts', async (page) => {
  await openPage(page);
  const exp = {
    format: 'burnin-experiment', version: 1, name: 'scaling',
    generator: { kind: 'lower-bound', actions: 2, horizon: 10, depth: 1 },
    episodes: 20000, seeds: 2, seed: 3,
    learners: [{ algorithm: 'uniform' }, { algorithm: 'ucbvi-bernstein', bonus_scale: 0.05 }],
    sweep: { parameter: 'depth', values: [1, 2, 3] },
  };
  await upload(page, 'scaling.json', JSON.stringify(exp));
  await page.waitForSelector('#panel-experiment:not([hidden])');
  await runAndWait(page);
  const r = await resultsJson(page);
  assertEqual(r.scaling_in, 'S', 'a depth sweep changes S alone');
  const rows = await page.locator('#results-table tr.scaling-row').allTextContents();
  assertEqual(rows.length, 2, 'a scaling row per learner');
  assert(rows[0].startsWith('uniform: scaling in S') && rows[0].includes('did not settle by K at 3 of 3 points; published no bound'), rows[0]);
  assert(rows[1].includes('published S^3 (does not apply)'), rows[1]);
  const views = await page.locator('#chart-view option').evaluateAll((os) => os.map((o) => o.value));
  assert(views.includes('sweep-scaling') && views.includes('sweep-regret-scaling'), `views: ${views}`);
  await page.selectOption('#chart-view', 'sweep-regret-scaling');
  const svg = (await downloadText(page, '#export-svg')).text;
  assert(svg.includes('uniform: fit S^'), 'the fitted power law is drawn and named');
  // UCBVI-Bernstein's bound at K is the trivial H·K at every point here: no
  // published order of regret is drawn; its burn-in order (S³) is.
  assert(!svg.includes('published S^'), 'no order drawn for a trivial bound');
  await page.selectOption('#chart-view', 'sweep-scaling');
  const burn = (await downloadText(page, '#export-svg')).text;
  assert(burn.includes('ucbvi-bernstein ×0.05: published S^3 (does not apply)'), 'the published burn-in order is drawn and named');
});

await check('results whose curves sit near the largest double draw on bounded log axes, and the page stays usable (#35 §4)', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '300');
  await runAndWait(page);
  const r = await resultsJson(page);
  // Forge curves at 9·10³⁰⁷ with an upper end at the largest double: the
  // chart must draw (or say why not) without the bindings failing, and
  // every later action must still work.
  for (const l of r.learners) {
    l.regret_mean = l.regret_mean.map(() => 9e307);
    l.regret_hi = l.regret_hi.map(() => 1.7976931348623157e308);
    l.regret_lo = l.regret_lo.map(() => 1e307);
  }
  await upload(page, 'huge-results.json', JSON.stringify(r));
  await page.waitForFunction(() => document.getElementById('notice').textContent === 'Showing results from huge-results.json.', null, { timeout: 20000 });
  await page.check('input[name=axes][value=log]');
  const svg = (await downloadText(page, '#export-svg')).text;
  assert(svg.startsWith('<svg') || svg.startsWith('<?xml'), 'the log chart exports');
  await page.selectOption('#chart-view', 'episode');
  const again = (await downloadText(page, '#export-svg')).text;
  assert(again.includes('per-episode') || again.length > 1000, 'a later view still draws');
  // And a normal run afterwards replaces them and draws.
  await page.click('#tab-experiment');
  await runAndWait(page);
  assert((await downloadText(page, '#export-svg')).text.length > 1000, 'the page is usable after');
});
