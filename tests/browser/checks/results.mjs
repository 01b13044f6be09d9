// Browser checks of the results: tables, charts, exports, decomposition, comparisons, sweeps, presentation.
// Run by check.mjs; shared helpers in helpers.mjs.

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { checks, out, fixtures, browser, shownValue, openAny, openPage, upload, startRun, runAndWait, downloadText, resultsJson, ferry, ferryCli, assert, assertEqual } from './helpers.mjs';

const check = checks('results', import.meta.url);

await check('where regret is paid: the page shows the core\'s exact decomposition, equal to `burnin run`\'s, summing to the regret, and compares two learners', async (page) => {
  await openPage(page);
  await upload(page, 'ferry-experiment.json', ferry);
  await page.waitForSelector('#panel-experiment:not([hidden])');
  assert(await page.isChecked('#exp-decompose'), 'the file asks for the decomposition and the form says so');
  await runAndWait(page);
  const r = await resultsJson(page);
  ferryCli.learners.forEach((l, i) => {
    assertEqual(JSON.stringify(r.learners[i].regret_by_cell), JSON.stringify(l.regret_by_cell), `${l.label}: the cells equal the CLI's, every bit`);
    const k = l.regret_mean[l.regret_mean.length - 1];
    const sum = l.regret_by_cell.flat(2).reduce((a, b) => a + b, 0);
    assert(Math.abs(sum - k) <= 1e-9 * Math.max(k, 1), `${l.label}: the cells sum to the regret at K (${sum} vs ${k})`);
  });
  await page.selectOption('#heat-view', 'regret');
  const shown = await page.locator('#heat-wrap td[data-value]').evaluateAll((tds) => tds.map((t) => Number(t.dataset.value)));
  const want = ferryCli.learners[0].regret_by_step_state;
  const S = want[0].length, H = want.length;
  assertEqual(shown.length, S * H, 'a cell per (state, step)');
  for (let s = 0; s < S; s++) for (let h = 0; h < H; h++) assertEqual(shown[s * H + h], want[h][s], `map (h=${h + 1}, s=${s})`);
  assert(/of its regret .* at K \(100\.0%\)/.test(await page.locator('#heat-caption').textContent()), 'the share is printed');
  const tip = await page.locator('#heat-wrap td[title]').first().getAttribute('title');
  assert(/^h=1, .*% of the regret at K\) — /.test(tip), `the action split on hover: ${tip}`);
  await page.selectOption('#heat-view', 'regret-diff');
  const diff = await page.locator('#heat-wrap td[data-value]').evaluateAll((tds) => tds.map((t) => Number(t.dataset.value)));
  const [a, b] = [ferryCli.learners[0], ferryCli.learners[1]];
  assertEqual(diff[0], a.regret_by_step_state[0][0] - b.regret_by_step_state[0][0], 'the difference map is A − B');
  const cells = await downloadText(page, '#export-cells');
  assert(cells.text.startsWith('learner,algorithm,step,state,action,state_label,action_label,regret,share\n'), 'the cells CSV from the core');
  await page.selectOption('#heat-view', 'regret');
  await page.locator('#heat-section').screenshot({ path: join(out, 'regret-map.png') });
});

await check('charts and results export as PNG, SVG, JSON and CSV, and results re-open', async (page, context) => {
  await openPage(page);
  await upload(page, 'ferry-experiment.json', ferry);
  await runAndWait(page);
  const png = await Promise.all([page.waitForEvent('download'), page.click('#export-png')]);
  assert(png[0].suggestedFilename().endsWith('.png'), 'png name');
  assertEqual(readFileSync(await png[0].path()).subarray(1, 4).toString(), 'PNG', 'PNG signature');
  const svg = await downloadText(page, '#export-svg');
  assert(svg.name.endsWith('.svg') && svg.text.startsWith('<svg') && svg.text.includes(ferryCli.learners[2].label), 'svg content');
  const csv = await downloadText(page, '#export-csv');
  assert(csv.text.startsWith('learner,algorithm,episode,regret_mean'), 'csv header');
  const json = await downloadText(page, '#export-json');
  // Native and wasm agree bit for bit on everything the run produced (the
  // page names its experiment after the model; nothing else may differ).
  const fromPage = JSON.parse(json.text);
  delete fromPage.name;
  const fromCli = { ...ferryCli };
  delete fromCli.name;
  const diff = (a, b, path = '') => { if (JSON.stringify(a) === JSON.stringify(b)) return null; if (a && b && typeof a === 'object') { for (const k of new Set([...Object.keys(a), ...Object.keys(b)])) { const d = diff(a[k], b[k], `${path}.${k}`); if (d) return d; } } return `${path}: page ${JSON.stringify(a)?.slice(0, 200)} vs cli ${JSON.stringify(b)?.slice(0, 200)}`; };
  assertEqual(diff(fromPage, fromCli), null, 'the page\'s results file against burnin run --json');
  const again = await context.newPage();
  await openAny(again);
  await again.setInputFiles('#file-input', { name: json.name, mimeType: 'application/json', buffer: Buffer.from(json.text) });
  await again.waitForSelector('#results:not([hidden])');
  const shown = await again.locator('#results-table tbody td[data-value]').evaluateAll((tds) => tds.map((t) => Number(t.dataset.value)));
  assertEqual(shown[2], ferryCli.learners[2].regret_mean.at(-1), 're-opened results');
});

await check('the chart is the core\'s: the page\'s SVG equals `burnin plot`\'s, the canvas shows every series, and the hover reads the drawing', async (page) => {
  await openPage(page);
  const file = 'ferry-experiment.json.results.json';
  await upload(page, file, readFileSync(join(out, file), 'utf8'));
  await page.waitForSelector('#results:not([hidden])');
  await page.waitForFunction(() => Number(document.getElementById('chart').dataset.series) > 0);
  const cli = (suffix) => readFileSync(join(out, `ferry-experiment.json.${suffix}.svg`), 'utf8');
  // The same results, options and size: the same bytes.
  assertEqual((await downloadText(page, '#export-svg')).text, cli('chart'), 'default view: page SVG = burnin plot');
  await page.check('input[name=axes][value=log]');
  await page.check('#show-lower');
  await page.check('#show-bounds');
  assertEqual((await downloadText(page, '#export-svg')).text, cli('chart-log'), 'log-log with bounds: page SVG = burnin plot --log --lower --bounds');
  await page.check('input[name=axes][value=linear]');
  await page.selectOption('#chart-view', 'difference');
  assertEqual((await downloadText(page, '#export-svg')).text, cli('chart-difference'), 'difference: page SVG = burnin plot --view difference');
  // Pixel checks: each learner's colour (the core's palette) is drawn on
  // the canvas, in the plot and in the legend; with the bands off no
  // band tint is left.
  await page.selectOption('#chart-view', 'cumulative');
  const palette = await page.evaluate(async () => (await (await import('./compute.js')).catalogue()).palette);
  const count = (colours, tol) => page.evaluate(([cs, t]) => {
    const c = document.getElementById('chart');
    const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
    const rgb = cs.map((h) => [1, 3, 5].map((i) => parseInt(h.slice(i, i + 2), 16)));
    const n = rgb.map(() => 0);
    for (let i = 0; i < d.length; i += 4) {
      rgb.forEach((q, k) => { if (Math.abs(d[i] - q[0]) <= t && Math.abs(d[i + 1] - q[1]) <= t && Math.abs(d[i + 2] - q[2]) <= t) n[k]++; });
    }
    return n;
  }, [colours, tol]);
  const learners = ferryCli.learners.length;
  const drawn = await count(palette.slice(0, learners), 2);
  drawn.forEach((n, i) => assert(n >= 40, `${ferryCli.learners[i].label}: ${n} pixels of its colour ${palette[i]}`));
  assertEqual((await count(palette.slice(learners), 2)).reduce((a, b) => a + b, 0), 0, 'no colour of a learner the results do not have');
  // A band is the learner's colour at 16% over the card (#fffdf8).
  const tint = (h) => '#' + [1, 3, 5].map((i) => { const c = parseInt(h.slice(i, i + 2), 16), bg = parseInt('fffdf8'.slice(i - 1, i + 1), 16); return Math.round(bg + 0.16 * (c - bg)).toString(16).padStart(2, '0'); }).join('');
  const width = (l) => l.regret_hi.reduce((a, h, i) => a + h - l.regret_lo[i], 0);
  const widest = ferryCli.learners.reduce((b, l, i) => (width(l) > width(ferryCli.learners[b]) ? i : b), 0);
  const bandPixels = async () => (await count([tint(palette[widest])], 3))[0];
  const withBands = await bandPixels();
  assert(withBands > 500, `${ferryCli.learners[widest].label}'s band is drawn (${withBands} pixels)`);
  await page.uncheck('#show-bands');
  assert(await bandPixels() < withBands / 10, 'with the bands off their tint is gone');
  await page.check('#show-bands');
  // The hover read-out comes from the core's mapping of this drawing: at
  // the pixel column of a checkpoint it names that checkpoint.
  const box = await page.locator('#chart').boundingBox();
  const ks = ferryCli.learners[0].checkpoints;
  await page.mouse.move(box.x + box.width * 0.5, box.y + box.height * 0.5);
  await page.waitForSelector('#chart-tip:not([hidden])');
  const tip = await page.locator('#chart-tip').textContent();
  const k = Number(/^k = ([\d,]+)/.exec(tip)[1].replace(/,/g, ''));
  assert(ks.includes(k), `the read-out names a checkpoint (${k})`);
  const l0 = ferryCli.learners[0];
  const at = ks.indexOf(k);
  assert(tip.includes(`${l0.label}: `), `the read-out names ${l0.label}`);
  const value = Number(new RegExp(`${l0.label.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}: ([\\d.]+)`).exec(tip)[1]);
  assert(Math.abs(value - l0.regret_mean[at]) <= 0.051 + 0.005 * l0.regret_mean[at], `read-out value ${value} is the curve's ${l0.regret_mean[at]}`);
});

await check('the comparison table downloads in the core\'s three formats, as `burnin table` writes them', async (page) => {
  await openPage(page);
  const file = 'ferry-experiment.json.results.json';
  await upload(page, file, readFileSync(join(out, file), 'utf8'));
  await page.waitForSelector('#results:not([hidden])');
  const formats = await page.locator('#table-format option').evaluateAll((os) => os.map((o) => `${o.value}:${o.textContent}`));
  assertEqual(formats.join(','), 'markdown:Markdown,latex:LaTeX,csv:CSV', 'the core\'s formats are offered');
  for (const ext of ['md', 'tex', 'csv']) {
    await page.selectOption('#table-format', { index: ['md', 'tex', 'csv'].indexOf(ext) });
    const t = await downloadText(page, '#export-table');
    assert(t.name.endsWith(`-table.${ext}`), `file name ${t.name}`);
    assertEqual(t.text, readFileSync(join(out, `ferry-experiment.json.table.${ext}`), 'utf8'), `.${ext}: the page's table is burnin table's, byte for byte`);
  }
  // Results of a run in the page (merged from its workers' shards) come
  // with the table too: a row per learner, the page's caution at the end.
  await upload(page, 'ferry-experiment.json', ferry);
  await page.waitForSelector('#panel-experiment:not([hidden])');
  await runAndWait(page);
  assertEqual(await page.inputValue('#table-format'), 'csv', 'the chosen format stays');
  await page.selectOption('#table-format', 'markdown');
  const md = (await downloadText(page, '#export-table')).text;
  const rows = md.split('\n').filter((l) => l.startsWith('| '));
  assertEqual(rows.length, 2 + ferryCli.learners.length, 'a header, its rule and a row per learner');
  const caution = await page.textContent('#results .caution');
  assert(md.trimEnd().endsWith(caution), 'the caption ends with the caution under the results');
});

await check('results from an earlier build still open, chart and plot', async (page) => {
  await openPage(page);
  const old = readFileSync(join(fixtures, 'results-from-an-earlier-build.json'), 'utf8');
  await upload(page, 'results-from-an-earlier-build.json', old);
  await page.waitForSelector('#results:not([hidden])');
  await page.waitForFunction(() => Number(document.getElementById('chart').dataset.series) > 0);
  const views = await page.locator('#chart-view option').evaluateAll((os) => os.map((o) => o.value));
  assertEqual(views.join(','), 'cumulative,episode', 'no comparisons in the old file: no difference view');
  const svg = (await downloadText(page, '#export-svg')).text;
  assertEqual(svg, readFileSync(join(out, 'results-from-an-earlier-build.chart.svg'), 'utf8'), 'page SVG = burnin plot of the old file');
});

await check('the numbers are explained where they are shown, from the core\'s glossary; exports carry their caption; legends name the bound lines', async (page) => {
  await openPage(page);
  assert((await page.getAttribute('#optimal-value-term', 'title')).startsWith('V*₁(ρ)'), 'the optimal value is defined in place');
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '300');
  await runAndWait(page);
  const hints = await page.locator('#results-table thead th').evaluateAll((ths) => ths.map((t) => [t.textContent, t.title]));
  for (const name of ['regret at K', 'slope [95% bootstrap]', 'burn-in [95% bootstrap]', 'model updates']) {
    const h = hints.find(([t]) => t === name);
    assert(h && h[1].length > 20, `"${name}" has a definition: ${JSON.stringify(h)}`);
  }
  await page.click('#glossary summary');
  const terms = await page.locator('#glossary-list dt').allTextContents();
  assert(['optimal value', 'burn-in', 'slope', 'published bound', 'lower-bound shape'].every((t) => terms.includes(t)), `glossary: ${terms}`);
  // The SVG export holds the caption that explains the line styles, and the
  // legend names the dashed bound lines.
  await page.check('#show-bounds');
  const svg = (await downloadText(page, '#export-svg')).text;
  assert(svg.includes('Shaded: 95% Student-t intervals'), 'the caption is in the exported picture');
  assert(svg.includes('dashed: published bound'), 'the legend names the bound lines');
  assert(svg.includes('thick tick: burn-in'), 'the legend names the burn-in ticks');
  // The summary table as CSV, a row per learner, from the core.
  const summary = (await downloadText(page, '#export-summary')).text.trim().split('\n');
  assert(summary[0].startsWith('learner,algorithm,regret_at_k,regret_lo,regret_hi,slope,slope_lo,slope_hi,burn_in'), summary[0]);
  assertEqual(summary.length - 1, await page.locator('#results-table tbody tr').count(), 'a row per learner');
  const r = await resultsJson(page);
  const seeds = (await downloadText(page, '#export-seeds')).text.trim().split('\n');
  assertEqual(seeds[0], 'learner,algorithm,seed_index,run_seed,episode,regret', 'per-seed header');
  assertEqual(seeds.length - 1, r.learners.reduce((n, l) => n + l.run_seeds.length * l.checkpoints.length, 0), 'a row per (learner, seed, checkpoint)');
  // A CSV opened in the page is named for what it is, and nothing changes.
  const csv = (await downloadText(page, '#export-csv')).text;
  await upload(page, 'results.csv', csv);
  await page.waitForFunction(() => /CSV tables Burnin writes/.test(document.getElementById('problems').textContent), null, { timeout: 5000 });
  assert(await page.isVisible('#results'), 'the results stay');
});

await check('a sweep draws regret at K against the swept parameter', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '400');
  await page.fill('#exp-seeds', '2');
  // Keep two learners.
  const rows = page.locator('#learner-rows tr');
  for (let i = 2; i < await rows.count(); i++) await rows.nth(i).locator('input[type=checkbox]:not(.swept)').uncheck();
  await page.selectOption('#sweep-param', 'bonus_scale');
  await page.fill('#sweep-values', '0.001, 0.01, 0.1');
  await runAndWait(page);
  assertEqual(await page.locator('#chart-view option').first().textContent(), 'regret at K against bonus_scale', 'sweep view');
  assertEqual(await page.locator('#results-table thead th').allTextContents().then((t) => t.slice(1).join('|')), 'bonus_scale = 0.001|bonus_scale = 0.01|bonus_scale = 0.1', 'sweep table');
  // The swept learners' labels no longer name the value they came with.
  const swept = await page.locator('#results-table tbody th').allTextContents();
  assertEqual(swept.join('|'), 'mvp (bonus scale swept)|mvp (bonus scale swept) #2', 'labels follow the sweep');
  // A sweep applies to the learners the user leaves it on for.
  await page.locator('#learner-rows tr:nth-child(1) .swept').uncheck();
  await runAndWait(page);
  const picked = await page.locator('#results-table tbody th').allTextContents();
  assertEqual(picked.join('|'), 'MVP, theory constants|mvp (bonus scale swept)', 'only the second is swept');
  const r = await resultsJson(page);
  assertEqual(r.points[0].learners[0].label, 'MVP, theory constants', 'the first keeps its own value');
  assert(r.points.every((pt) => pt.learners[0].final_regret[0] === r.points[0].learners[0].final_regret[0]), 'and the same numbers at every point');
  await page.screenshot({ path: join(out, 'sweep.png'), fullPage: true });
  await page.fill('#sweep-values', '0.1, -2');
  await startRun(page);
  await page.waitForSelector('#exp-problems:not([hidden])');
  assertEqual((await page.locator('#exp-problems li').allTextContents())[0], 'sweep.values[1]: expected a bonus scale > 0, found -2', 'bad sweep value');
});

await check('the presentation view fills the window and closes with Escape', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '300');
  await runAndWait(page);
  await page.click('#present');
  assert(await page.locator('#presenter').isVisible(), 'presenter shown');
  const size = await page.evaluate(() => [document.getElementById('present-chart').clientWidth, window.innerWidth]);
  assertEqual(size[0], size[1], 'chart as wide as the window');
  await page.screenshot({ path: join(out, 'present.png') });
  await page.keyboard.press('Escape');
  assert(!(await page.locator('#presenter').isVisible()), 'closed');
});

await check('one seed shows no interval and says so; the default set-up runs eight', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  assertEqual(await page.inputValue('#exp-seeds'), '8', 'default seeds');
  await page.fill('#exp-episodes', '100');
  await page.fill('#exp-seeds', '1');
  const rows = page.locator('#learner-rows tr');
  for (let i = 1; i < await rows.count(); i++) await rows.nth(i).locator('input[type=checkbox]:not(.swept)').uncheck();
  await runAndWait(page);
  const cells = await page.locator('#results-table tbody tr').first().locator('td').allTextContents();
  assertEqual(cells[1], 'n/a (one seed)', 'interval cell');
  // At 1360 px the results table fits its card: no column runs past the right edge.
  const [scroll, client] = await page.locator('#results-table').evaluate((w) => [w.scrollWidth, w.clientWidth]);
  assert(scroll <= client, `results table fits (${scroll} > ${client})`);
  assert(await page.locator('#results-table [data-warning=one-seed]').count() === 1, 'one-seed warning shown');
});

await check('two learners are compared by a paired interval with a one-line verdict and a difference chart', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  await page.fill('#exp-episodes', '300');
  const rows = page.locator('#learner-rows tr');
  // Keep ε-greedy and uniform.
  const algs = await rows.evaluateAll((trs) => trs.map((tr) => tr.querySelector('select').value));
  for (let i = 0; i < algs.length; i++) if (!['eps-greedy', 'uniform'].includes(algs[i])) await rows.nth(i).locator('input[type=checkbox]:not(.swept)').uncheck();
  await runAndWait(page);
  const results = JSON.parse((await downloadText(page, '#export-json')).text);
  assertEqual(results.comparisons.length, 1, 'one pair');
  // Burn-in with its bootstrap interval, and the PAC-style ε readings beside the PAC order.
  const heads = await page.locator('#results-table thead th').allTextContents();
  assertEqual(heads[4], 'burn-in [95% bootstrap]', 'burn-in header');
  assert(heads[6].includes('first ε-optimal episode (PAC order') && heads[6].includes('settled within ε after'), heads[6]);
  const cells = await page.locator('#results-table tbody tr').first().locator('td').allTextContents();
  const l0 = results.learners[0];
  const iv = l0.burn_in_interval;
  assert(iv !== null, 'eight seeds give a bootstrap interval');
  // The core's text, as `burnin run` prints it: the value (or "not settled")
  // and how many seeds still grow linearly or settled.
  const want = l0.burn_in === null ? 'not settled' : `${l0.burn_in} [`;
  assert(cells[3].startsWith(want), `burn-in cell "${cells[3]}"`);
  if (l0.seeds_linear_at_k > 0) assert(cells[3].includes(`${l0.seeds_linear_at_k} of 8 seeds still linear at K`), cells[3]);
  const c = results.comparisons[0];
  assertEqual(await page.locator('#cmp-verdict').textContent(), c.verdict, 'the core\'s verdict is shown');
  assert(/^(eps-greedy ε=0\.1|uniform) (below|above|and) /.test(c.verdict) && c.verdict.includes('95% paired interval'), c.verdict);
  // Reversing A and B names the same comparison; the chart draws A − B.
  await page.selectOption('#cmp-a', c.b);
  await page.selectOption('#cmp-b', c.a);
  assertEqual(await page.locator('#cmp-verdict').textContent(), c.verdict, 'either order');
  // The difference chart draws A − B: its hover read-out names that series.
  await page.selectOption('#chart-view', 'difference');
  const box = await page.locator('#chart').boundingBox();
  await page.mouse.move(box.x + box.width * 0.4, box.y + box.height * 0.5);
  await page.waitForSelector('#chart-tip:not([hidden])');
  const tip = await page.locator('#chart-tip').textContent();
  assert(tip.includes(`${c.b} − ${c.a}`), `hover read-out of the difference: ${tip}`);
});

await check('a scaled bonus\'s bound is labelled as not applying, and MVP\'s bonus-below-H point is marked', async (page) => {
  await openPage(page);
  await page.selectOption('#demo-select', 'experiments/porch-lantern-theory.json');
  await shownValue(page, 'Porch lantern');
  await page.fill('#exp-episodes', '1000000');
  await page.fill('#exp-seeds', '2');
  await runAndWait(page);
  const results = JSON.parse((await downloadText(page, '#export-json')).text);
  const [theory, scaled] = results.learners;
  assert(theory.bound.applies && !scaled.bound.applies && scaled.bound.note.includes('scaled by 0.05'), 'applies flags');
  assert(theory.bound.bonus_below_h > 0 && theory.bound.bonus_below_h <= 1000000, `marker inside K: ${theory.bound.bonus_below_h}`);
  await page.check('#show-bounds');
  const svg = (await downloadText(page, '#export-svg')).text;
  assert(svg.includes(`${scaled.label}: bound, does not apply (bonus scaled)`), 'not-applying bound named in the legend');
  assert(svg.includes(`${theory.label}: bonus &lt; H from K ≈`) || svg.includes(`${theory.label}: bonus < H from K ≈`), 'bonus-below-H marker named in the legend');
});

await check('canvases are sharp on a high-density screen', async (page, context) => {
  const hi = await browser.newContext({ viewport: { width: 1200, height: 800 }, deviceScaleFactor: 2 });
  try {
    const p = await hi.newPage();
    await openPage(p);
    await p.click('#tab-experiment');
    await p.fill('#exp-episodes', '200');
    await runAndWait(p);
    // The chart is drawn once the core's typeface has loaded, after the
    // status line: wait for it as the other chart checks do.
    await p.waitForFunction(() => Number(document.getElementById('chart').dataset.series) > 0);
    const [w, css] = await p.evaluate(() => { const c = document.getElementById('chart'); return [c.width, c.clientWidth]; });
    assertEqual(w, css * 2, 'backing store at twice the CSS width');
  } finally {
    await hi.close();
  }
});

await check('readings that say only what the data says (#33): scaled rows are named, shared draws make two identical learners equal, a results-file notice goes when a run replaces the results, the A − B map has no learner box of its own, and a sweep shows slope and burn-in per point with its cells CSV', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  // The ready set-up carries scaled rows: the page names them.
  await page.waitForSelector('#scaled-note:not([hidden])');
  const note = await page.textContent('#scaled-note');
  assert(note.includes('MVP ×0.002') && note.includes('ucbvi-bernstein ×0.05'), `scaled rows named: ${note}`);
  // Two rows of MVP at scale 1 (the same learner twice), under shared draws.
  const rows = page.locator('#learner-rows tr');
  await rows.nth(1).locator('input[type=number]').fill('1');
  for (let i = 2; i < await rows.count(); i++) await rows.nth(i).locator('input[type=checkbox]:not(.swept)').uncheck();
  await page.waitForSelector('#scaled-note', { state: 'hidden' });
  await page.check('#exp-shared');
  await page.fill('#exp-episodes', '300');
  await page.fill('#exp-seeds', '3');
  await runAndWait(page);
  const r = await resultsJson(page);
  assert(r.shared_draws === true, 'the results say the draws were shared');
  const c = r.comparisons[0];
  assertEqual(JSON.stringify([c.at_k.mean, c.at_k.lo, c.at_k.hi]), '[0,0,0]', 'identical learners under shared draws differ by exactly 0');
  // A results file opened: the notice names it; a new run replaces it and the notice goes.
  await upload(page, 'earlier-results.json', JSON.stringify(r));
  await page.waitForFunction(() => document.getElementById('notice').textContent === 'Showing results from earlier-results.json.');
  await page.click('#tab-experiment');
  await runAndWait(page);
  assert(await page.locator('#notice').isHidden(), `the notice went: "${await page.textContent('#notice')}"`);
  // The A − B map shows the compared pair, with no learner box of its own.
  await page.selectOption('#heat-view', 'regret-diff');
  assert(await page.locator('#heat-learner').isHidden(), 'no learner box beside the A − B map');
  await page.selectOption('#heat-view', 'visits');
  assert(await page.locator('#heat-learner').isVisible(), 'the learner box is back for one learner\'s map');
  // A sweep: every point's cell gives slope and burn-in; its cells CSV is
  // offered. One MVP row (a swept learner takes the core's label, so two
  // rows of one algorithm would share it).
  await rows.nth(1).locator('input[type=checkbox]:not(.swept)').uncheck();
  await page.selectOption('#sweep-param', 'bonus_scale');
  await page.fill('#sweep-values', '0.01, 1');
  await runAndWait(page);
  const cells = await page.locator('#results-table tbody td').allTextContents();
  assert(cells.length === 2 && cells.every((t) => /slope .* · burn-in /.test(t)), `sweep cells: ${JSON.stringify(cells)}`);
  assert(!(await page.locator('#export-cells').isDisabled()), 'a sweep offers its cells CSV');
  const csv = (await downloadText(page, '#export-cells')).text.split('\n');
  assert(csv[0].startsWith('bonus_scale,learner,algorithm,step,state,action'), csv[0]);
});
