// What the browser checks of every view share: the environment that
// `cargo xtask test` passes (see check.mjs), the browser, `checks` (a view's
// `check`, which names the view and its file when a check fails), the
// assertions, and the steps many checks take on the page.
import { chromium } from 'playwright-core';
import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';

export const url = process.env.BURNIN_URL;
// The site `cargo xtask dist` wrote, served from a sub-path (BURNIN_DIST_URL,
// ending in '/'), its folder, a second build to publish over it, and what
// `burnin --version` printed.
export const distUrl = process.env.BURNIN_DIST_URL;
export const distDir = process.env.BURNIN_DIST_DIR;
export const distNext = process.env.BURNIN_DIST_NEXT;
export const cliVersion = process.env.BURNIN_VERSION;
export const expected = JSON.parse(process.env.BURNIN_EXPECTED);
export const out = process.env.BURNIN_OUT || 'out';
export const fixtures = new URL('../fixtures/', import.meta.url).pathname;
mkdirSync(out, { recursive: true });

export const browser = await chromium.launch({
  executablePath: process.env.BURNIN_CHROMIUM || '/usr/bin/chromium',
  args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
    '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});

let passed = 0, failed = 0;
/** The checks that failed, each as "view (file): name". */
const failures = [];
const only = process.env.BURNIN_ONLY;

/**
 * The `check(name, body)` of one view, whose checks live in the file
 * `fileUrl` (its import.meta.url): runs `body(page, context)` in a fresh
 * browser context and says ok or FAIL, a failure naming the view and the
 * file. BURNIN_ONLY runs only the checks whose name contains it, or the
 * view it names.
 */
export function checks(view, fileUrl) {
  const file = `tests/browser/checks/${fileUrl.split('/').pop()}`;
  return (name, body) => check(view, file, name, body);
}

async function check(view, file, name, body) {
  if (only && !name.includes(only) && only !== view) return;
  const context = await browser.newContext({ viewport: { width: 1360, height: 900 }, deviceScaleFactor: 1, acceptDownloads: true });
  const problems = [];
  const watch = (page) => {
    page.on('console', (m) => { if (m.type() === 'error') problems.push(`console error: ${m.text()}`); });
    page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
    page.on('request', (r) => { if (!r.url().startsWith(url) && !(distUrl && r.url().startsWith(distUrl)) && !r.url().startsWith('data:') && !r.url().startsWith('blob:')) problems.push(`request outside the page: ${r.url()}`); });
  };
  context.on('page', watch);
  const page = await context.newPage();
  try {
    await body(page, context);
    if (problems.length) throw new Error(problems.join('\n'));
    passed++;
    console.log(`ok   ${view}: ${name}`);
  } catch (err) {
    failed++;
    failures.push(`${view} (${file}): ${name}`);
    // What the page said may explain a time-out better than the time-out does.
    const status = await page.locator('#status').textContent({ timeout: 1000 }).catch(() => '(no status line)');
    const expStatus = await page.locator('#exp-status').textContent({ timeout: 1000 }).catch(() => '');
    const expProblems = await page.locator('#exp-problems').textContent({ timeout: 1000 }).catch(() => '');
    const why = [String(err.stack || err), `page status: ${status}`, ...(expStatus ? [`experiment status: ${expStatus}`] : []), ...(expProblems.trim() ? [`experiment problems: ${expProblems.trim()}`] : []), ...problems].join('\n');
    console.log(`FAIL ${view} (${file}): ${name}\n     ${why.split('\n').join('\n     ')}`);
  } finally {
    await context.close();
  }
}

/** Closes the browser and says how the checks went; the exit status is 1 if any failed. */
export async function finish() {
  await browser.close();
  if (failures.length) console.log(`\nfailed:\n  ${failures.join('\n  ')}`);
  console.log(`\nbrowser: ${passed} passed, ${failed} failed`);
  process.exit(failed === 0 ? 0 : 1);
}

export function assertEqual(got, want, what) {
  if (got !== want) throw new Error(`${what}: got ${JSON.stringify(got)}, expected ${JSON.stringify(want)}`);
}
export function assert(cond, what) { if (!cond) throw new Error(what); }

export const index = await (await fetch(`${url}/demo-models/index.json`)).json();
export const demoName = async (file) => (await (await fetch(`${url}/demo-models/${file}`)).json()).name;
export const defaultName = await demoName(index.default);
export const headline = (x) => x.toFixed(6).replace('-', '−');

/** The optimal value once a model named `name` is on screen. */
export async function shownValue(page, name) {
  await page.waitForFunction((n) => {
    const dd = document.querySelector('[data-fact="name"]');
    return dd && dd.textContent === n && document.getElementById('optimal-value').dataset.value;
  }, name, { timeout: 15000 });
  const o = page.locator('#optimal-value');
  return { data: Number(await o.getAttribute('data-value')), text: await o.textContent() };
}

/** The page with whatever model it opens (the autosave, when there is one). */
export async function openAny(page) {
  await page.goto(url + '/');
  await page.waitForFunction(() => document.getElementById('optimal-value').dataset.value, null, { timeout: 15000 });
}

export async function openPage(page, hash = '') {
  await page.goto(url + '/' + hash);
  return shownValue(page, defaultName);
}

export async function upload(page, name, text) {
  await page.setInputFiles('#file-input', { name, mimeType: 'application/json', buffer: Buffer.from(text) });
}

/**
 * Clicks Run and, when the page asks before a long run, says to run it;
 * returns the long-run question's text ('' when it did not ask).
 */
export async function startRun(page) {
  await page.click('#run-exp');
  await page.waitForFunction(() => document.getElementById('long-run').open || !/^Estimating/.test(document.getElementById('exp-status').textContent), null, { timeout: 20000 });
  if (!(await page.evaluate(() => document.getElementById('long-run').open))) return '';
  const asked = await page.textContent('#long-run-text');
  await page.click('#long-run-go');
  return asked;
}

export async function runAndWait(page) {
  await startRun(page);
  await page.waitForFunction(() => /^Done in/.test(document.getElementById('exp-status').textContent), null, { timeout: 120000 });
}

export async function downloadText(page, selector) {
  const [dl] = await Promise.all([page.waitForEvent('download'), page.click(selector)]);
  return { name: dl.suggestedFilename(), text: readFileSync(await dl.path(), 'utf8') };
}

/** Drops a file named `name` holding `text` on the page. */
export async function dropFile(page, name, text) {
  const dt = await page.evaluateHandle(([n, t]) => {
    const d = new DataTransfer();
    d.items.add(new File([t], n, { type: 'application/json' }));
    return d;
  }, [name, text]);
  await page.dispatchEvent('body', 'dragover', { dataTransfer: dt });
  await page.dispatchEvent('body', 'drop', { dataTransfer: dt });
}

export async function resultsJson(page) {
  return JSON.parse((await downloadText(page, '#export-json')).text);
}

/** The ferry fixture experiment, and what `burnin run --json` printed for it. */
export const ferry = readFileSync(join(fixtures, 'ferry-experiment.json'), 'utf8');
export const ferryCli = JSON.parse(readFileSync(join(out, 'ferry-experiment.json.results.json'), 'utf8'));
