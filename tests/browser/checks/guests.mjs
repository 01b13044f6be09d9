// Browser checks of your own learner modules, run in the page's workers.
// Run by check.mjs; shared helpers in helpers.mjs.

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { checks, expected, out, fixtures, index, defaultName, shownValue, openPage, upload, startRun, runAndWait, resultsJson, downloadText, assert, assertEqual } from './helpers.mjs';

const check = checks('guests', import.meta.url);

// Guest learners: a user's own learner module, run in the page's workers
// (src/learn/guest.rs; docs/formats.md, "Guest learners").
const examples = new URL('../../../examples/', import.meta.url).pathname;
const browserDir = new URL('../', import.meta.url).pathname;
const guestFixture = readFileSync(join(fixtures, 'two-doors-guest-experiment.json'), 'utf8');
const guestCliPath = join(out, 'two-doors-guest-experiment.json.results.json');

async function loadGuest(page, name, text) {
  await page.setInputFiles('#guest-file', { name, mimeType: 'text/javascript', buffer: Buffer.from(text) });
  await page.waitForFunction((n) => document.getElementById('guest-status').textContent.includes(`"${n.replace(/\.m?js$/, '')}"`), name, { timeout: 15000 });
}

await check('your own learner module runs in workers with exact regret: K·(V* − V^uniform), the built-in uniform\'s, and `burnin run`\'s', async (page) => {
  await openPage(page);
  await upload(page, 'two-doors-guest-experiment.json', guestFixture);
  await page.waitForSelector('#panel-experiment:not([hidden])');
  // The file names the learner; the page asks for its file before running.
  await startRun(page);
  await page.waitForFunction(() => /your learner "uniform" is not loaded/.test(document.getElementById('exp-problems').textContent), null, { timeout: 10000 });
  await loadGuest(page, 'uniform.mjs', readFileSync(join(examples, 'uniform.mjs'), 'utf8'));
  assertEqual(await page.locator('#learner-rows select').nth(1).inputValue(), 'guest:uniform', 'the row uses the loaded learner');
  await runAndWait(page);
  const r = await resultsJson(page);
  assertEqual(r.optimal_value, 1.6, 'V* of two doors (worked by hand in tests/guests.rs)');
  const [builtin, guest] = r.learners;
  assertEqual(guest.algorithm, 'guest', 'listed as a guest');
  assertEqual(guest.bound, null, 'no published bound for a guest');
  guest.checkpoints.forEach((k, i) => {
    // Each uniform episode costs 1.6 − 0.85 = 0.75, derived by hand (tests/guests.rs).
    assert(Math.abs(guest.regret_mean[i] - 0.75 * k) <= 1e-12 * 0.75 * k, `k = ${k}: ${guest.regret_mean[i]}`);
    assert(Math.abs(guest.regret_mean[i] - builtin.regret_mean[i]) <= 1e-12 * 0.75 * k, `k = ${k}: equals the built-in`);
  });
  // The same file in the CLI with the Python example: the same numbers, every bit.
  const cli = JSON.parse(readFileSync(guestCliPath, 'utf8'));
  assertEqual(JSON.stringify(r.learners), JSON.stringify(cli.learners), 'page (JS module) = `burnin run` (Python process)');
  assertEqual(await page.locator('#results-table tbody tr').count(), 2, 'a row per learner in the table');
});

for (const [how, want] of [
  ['throw', 'decide threw: the learner divided by zero'],
  ['malformed', '"actions"[0][0] must be an action 0 … 1, found 2'],
  ['silent', 'gave no answer within'],
]) {
  await check(`a learner module that ${how === 'silent' ? 'never answers' : how === 'throw' ? 'throws' : 'answers a malformed policy'} is stopped and named; the other learners' results stay`, async (page) => {
    await openPage(page);
    await page.evaluate(async () => (await import('./compute.js')).setGuestTimeoutForTest(1500));
    await upload(page, 'two-doors-guest-experiment.json', guestFixture.replace('"uniform", "label": "your uniform"', '"bad", "label": "my learner"'));
    await page.waitForSelector('#panel-experiment:not([hidden])');
    const source = readFileSync(join(browserDir, 'guests/misbehave.mjs'), 'utf8').replace("'BURNIN_HOW'", `'${how}'`);
    await loadGuest(page, 'bad.mjs', source);
    await runAndWait(page);
    const failed = await page.locator('#results-failed').textContent();
    assert(failed.includes('Your learner "my learner" failed in seed') && failed.includes(want) && failed.includes('left out of these results'), `the fault is named: ${failed}`);
    assertEqual(await page.locator('#results-table tbody tr').count(), 1, 'the built-in learner\'s results stay');
    const r = await resultsJson(page);
    assertEqual(r.learners.map((l) => l.label).join(), 'uniform', 'results hold the others');
    assert(r.failed.length >= 1 && r.failed.every((f) => f.label === 'my learner'), 'results list the fault');
  });
}

// #35: a batch of 2²⁰ episodes at H = 1000 (2³⁰ steps) ended the whole run
// with a wasm borrow error naming no learner; a batch is at most 2²⁰ steps,
// so it is refused like any malformed answer, the learner named and the
// built-in learner's results kept.
await check('a learner module asking for a batch over 2²⁰ steps is refused and named; the built-in learner\'s results stay', async (page) => {
  await openPage(page);
  const text = guestFixture.replace('"horizon": 2', '"horizon": 1000').replace('"episodes": 300', '"episodes": 20').replace('"uniform", "label": "your uniform"', '"bad", "label": "my learner"');
  await upload(page, 'two-doors-guest-experiment.json', text);
  await page.waitForSelector('#panel-experiment:not([hidden])');
  const source = readFileSync(join(browserDir, 'guests/misbehave.mjs'), 'utf8').replace("'BURNIN_HOW'", "'huge-batch'");
  await loadGuest(page, 'bad.mjs', source);
  await runAndWait(page);
  const failed = await page.locator('#results-failed').textContent();
  const want = '"episodes" must be 1 … 1048 (at most 1048576 steps a batch at H = 1000), found 1048576';
  assert(failed.includes('Your learner "my learner" failed in seed') && failed.includes(want), `the fault is named: ${failed}`);
  const r = await resultsJson(page);
  assertEqual(r.learners.map((l) => l.label).join(), 'uniform', 'the built-in learner\'s results stay');
});

// #35 §2: a row summing to 1 within the 10⁻⁹ tolerance is the distribution
// it is scaled to, so a module always playing the optimal action (left:
// V* = 1.6, worked by hand in tests/guests.rs) with rows [1 ± 9·10⁻¹⁰, 0]
// has regret exactly 0, as in `burnin run`.
for (const p of ['1.0000000009', '0.9999999991']) {
  await check(`a learner module playing the optimal policy with rows [${p}, 0] has regret exactly 0`, async (page) => {
    await openPage(page);
    await upload(page, 'two-doors-guest-experiment.json', guestFixture.replace('"uniform", "label": "your uniform"', '"rows", "label": "rows"'));
    await page.waitForSelector('#panel-experiment:not([hidden])');
    const source = `export default function start({ states: S, horizon: H }) {
      const table = Array.from({ length: H }, () => Array.from({ length: S }, () => [${p}, 0]));
      return { decide: (b) => (b.done === 0 ? { probabilities: table, episodes: 50 } : { keep: true, episodes: 50 }) };
    }`;
    await loadGuest(page, 'rows.mjs', source);
    await runAndWait(page);
    const r = await resultsJson(page);
    const rows = r.learners.find((l) => l.label === 'rows');
    assert(rows.regret_mean.every((x) => x === 0) && rows.final_regret.every((x) => x === 0), `regret ${rows.regret_mean}`);
  });
}

await check('a run with a learner module cancels promptly, even while the module never answers', async (page) => {
  await openPage(page);
  // The watchdog must not be what stops it: Cancel is.
  await page.evaluate(async () => (await import('./compute.js')).setGuestTimeoutForTest(60000));
  await upload(page, 'two-doors-guest-experiment.json', guestFixture.replace('"episodes": 300', '"episodes": 1000000').replace('"uniform", "label": "your uniform"', '"bad", "label": "my learner"'));
  await page.waitForSelector('#panel-experiment:not([hidden])');
  const source = readFileSync(join(browserDir, 'guests/misbehave.mjs'), 'utf8').replace("'BURNIN_HOW'", "'silent'");
  await loadGuest(page, 'bad.mjs', source);
  await startRun(page);
  await page.waitForFunction(() => Number(document.getElementById('exp-progress').value) > 0, null, { timeout: 20000 });
  await page.waitForTimeout(1500);
  const t0 = Date.now();
  await page.click('#cancel-exp');
  await page.waitForFunction(() => /^Cancelled/.test(document.getElementById('exp-status').textContent), null, { timeout: 5000 });
  const ms = Date.now() - t0;
  assert(ms < 2000, `cancelled in ${ms} ms`);
  // The replaced workers run the next experiment.
  await page.fill('#exp-episodes', '200');
  await page.selectOption('#learner-rows tr:nth-child(2) select', 'eps-greedy');
  await runAndWait(page);
});

await check('a learner module dropped on the learner table, or anywhere on the page, is added as a learner', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  const rows = await page.locator('#learner-rows tr').count();
  const drop = async (target, name) => {
    const dt = await page.evaluateHandle(([n, t]) => {
      const d = new DataTransfer();
      d.items.add(new File([t], n, { type: 'text/javascript' }));
      return d;
    }, [name, readFileSync(join(examples, 'optimist.mjs'), 'utf8')]);
    await page.dispatchEvent(target, 'dragover', { dataTransfer: dt });
    await page.dispatchEvent(target, 'drop', { dataTransfer: dt });
  };
  await drop('#guest-drop', 'optimist.mjs');
  await page.waitForFunction(() => /"optimist" is loaded/.test(document.getElementById('guest-status').textContent), null, { timeout: 15000 });
  await drop('body', 'second-idea.mjs');
  await page.waitForFunction(() => /"second-idea" is loaded/.test(document.getElementById('guest-status').textContent), null, { timeout: 15000 });
  assertEqual(await page.locator('#learner-rows tr').count(), rows + 2, 'a row for each');
  // The model stayed open: a module is never read as a model file.
  assertEqual((await shownValue(page, defaultName)).data, expected[index.default], 'the model is unchanged');
  await page.fill('#exp-episodes', '400');
  await runAndWait(page);
  const labels = await page.locator('#results-table tbody th').allTextContents();
  assert(labels.includes('optimist') && labels.includes('second-idea'), `both run: ${labels}`);
});

await check('a kept learner is shown as code before it runs, and links and files carry only its name', async (page) => {
  await openPage(page);
  await upload(page, 'two-doors-guest-experiment.json', guestFixture);
  await page.waitForSelector('#panel-experiment:not([hidden])');
  const source = readFileSync(join(examples, 'uniform.mjs'), 'utf8');
  await loadGuest(page, 'uniform.mjs', source);
  await page.getByRole('button', { name: 'Keep in this browser' }).click();
  await page.click('#share-link');
  await page.waitForFunction(() => document.getElementById('share-url').value.includes('#share='));
  const shared = await page.evaluate(async () => JSON.stringify(await (await import('./share.js')).decode(document.getElementById('share-url').value.split('#')[1])));
  assert(shared.includes('"guest":"uniform"') && !shared.includes('export default'), 'the link names the learner and carries no code');
  // After a reload the learner is not loaded: the kept copy is offered, shown first.
  await page.reload();
  await shownValue(page, 'Two doors');
  await page.click('#tab-experiment');
  assert((await page.locator('#guest-list').textContent()).includes('kept in this browser'), 'the kept copy is listed');
  assert(await page.locator('#learner-rows select').nth(1).evaluate((s) => s.selectedOptions[0].textContent.includes('not loaded')), 'the row says its learner is not loaded');
  await page.getByRole('button', { name: 'Show code and use…' }).click();
  await page.waitForSelector('#guest-code[open]');
  assertEqual(await page.locator('#guest-code-text').textContent(), source, 'the code is shown before it runs');
  await page.click('#guest-code-use');
  await page.waitForFunction(() => /"uniform" is loaded/.test(document.getElementById('guest-status').textContent), null, { timeout: 15000 });
  await runAndWait(page);
  assertEqual(await page.locator('#results-table tbody tr').count(), 2, 'it runs');
});

await check('"Add your learner…" says what the first decide receives and shows the smallest complete module, downloadable; both run', async (page) => {
  await openPage(page);
  await page.click('#tab-experiment');
  await page.click('#add-guest');
  await page.waitForSelector('#guest-add[open]');
  const smallest = readFileSync(join(examples, 'smallest.mjs'), 'utf8');
  await page.waitForFunction(() => document.getElementById('guest-add-code').textContent.length > 0);
  assertEqual(await page.locator('#guest-add-code').textContent(), smallest, 'the dialog shows examples/smallest.mjs');
  const first = (await page.locator('#guest-add-first').textContent()).replace(/\s+/g, ' ');
  for (const said of ['batch.done = 0', 'batch.episodes = 0', 'batch.states, batch.actions, batch.rewards, batch.next are empty arrays', 'not keep']) {
    assert(first.includes(said), `the first call: "${said}" in ${first}`);
  }
  const dl = await downloadText(page, '#guest-add-download');
  assertEqual(dl.name, 'smallest.mjs', 'downloaded file name');
  assertEqual(dl.text, smallest, 'the download is the module shown');
  // At a phone's width the dialog and its code fit without sideways scrolling.
  await page.setViewportSize({ width: 390, height: 800 });
  const fit = await page.evaluate(() => {
    const d = document.getElementById('guest-add').getBoundingClientRect();
    const pre = document.getElementById('guest-add-code');
    return { left: d.left, right: d.right, over: pre.scrollWidth - pre.clientWidth };
  });
  assert(fit.left >= 0 && fit.right <= 390 && fit.over <= 0, `fits at 390 px: ${JSON.stringify(fit)}`);
  await page.setViewportSize({ width: 1280, height: 900 });
  // "Choose a module file…" opens the file chooser; a module checking every
  // call against what the dialog says runs beside the smallest one.
  const [chooser] = await Promise.all([page.waitForEvent('filechooser'), page.click('#guest-add-choose')]);
  assert(!(await page.evaluate(() => document.getElementById('guest-add').open)), 'the dialog closes');
  await chooser.setFiles({ name: 'first-call.mjs', mimeType: 'text/javascript', buffer: readFileSync(join(browserDir, 'guests/first-call.mjs')) });
  await page.waitForFunction(() => document.getElementById('guest-status').textContent.includes('"first-call"'), null, { timeout: 15000 });
  await loadGuest(page, 'smallest.mjs', smallest);
  await page.fill('#exp-episodes', '30');
  await page.fill('#exp-seeds', '2');
  await runAndWait(page);
  const r = await resultsJson(page);
  assertEqual(JSON.stringify(r.failed ?? []), '[]', 'no learner failed');
  const labels = r.learners.map((l) => l.label);
  assert(labels.includes('first-call') && labels.includes('smallest'), `both ran: ${labels}`);
});
