// Browser checks of the charts' pictures (#34): no chart text is clipped
// or overlaps another at phone, tablet and laptop widths, shortened text
// can be read whole on hover, the transition graph's labels stay readable
// on a phone, and the page's PNG export matches `burnin plot`'s PNG.
// Run by check.mjs; shared helpers in helpers.mjs.

import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { checks, url, out, browser, shownValue, openPage, upload, defaultName, assert, assertEqual } from './helpers.mjs';

const check = checks('charts', import.meta.url);

/**
 * The pixels of two PNG files (bytes) compared in the page: the share of
 * pixels where some channel differs by more than `tol` (of 255), and
 * their sizes.
 */
async function pngDifference(page, a, b, tol) {
  return page.evaluate(async ([a, b, tol]) => {
    const pixels = async (b64) => {
      const img = new Image();
      img.src = `data:image/png;base64,${b64}`;
      await img.decode();
      const c = document.createElement('canvas');
      c.width = img.naturalWidth;
      c.height = img.naturalHeight;
      const g = c.getContext('2d');
      g.drawImage(img, 0, 0);
      return { w: c.width, h: c.height, d: g.getImageData(0, 0, c.width, c.height).data };
    };
    const [p, q] = [await pixels(a), await pixels(b)];
    if (p.w !== q.w || p.h !== q.h) return { size: [[p.w, p.h], [q.w, q.h]] };
    let differ = 0;
    for (let i = 0; i < p.d.length; i += 4) {
      if (Math.abs(p.d[i] - q.d[i]) > tol || Math.abs(p.d[i + 1] - q.d[i + 1]) > tol || Math.abs(p.d[i + 2] - q.d[i + 2]) > tol) differ++;
    }
    return { size: [[p.w, p.h]], share: differ / (p.w * p.h) };
  }, [a.toString('base64'), b.toString('base64'), tol]);
}

/**
 * The ferry fixture's results (what `burnin run --json` printed) with
 * learners relabelled as long as the issue's: words that wrap, and one
 * label of a single word longer than a phone's chart is wide, which must
 * be cut (and read whole on hover).
 */
const unbroken = 'ucbvi-bernstein-with-its-bonus-scaled-by-one-tenth-and-no-space-to-break-at';
const longLabels = {
  'mvp ×0.01': 'mvp ×0.01 with a label long enough to wrap',
  'ucbvi-hoeffding ×0.02': unbroken,
  psrl: 'psrl (posterior sampling)',
  'eps-greedy ε=0.2': 'eps-greedy ε=0.2',
  uniform: 'uniform random policy, the baseline',
};
function longResults() {
  const r = JSON.parse(readFileSync(join(out, 'ferry-experiment.json.results.json'), 'utf8'));
  for (const l of r.learners) l.label = longLabels[l.label];
  for (const c of r.comparisons) { c.a = longLabels[c.a]; c.b = longLabels[c.b]; }
  return r;
}

/** The chart's texts as the core placed them, and the browser's own measure of each one's ink. */
function chartTexts(page) {
  return page.evaluate(async () => {
    const { drawnTexts } = await import('./charts.js');
    const canvas = document.getElementById('chart');
    const d = drawnTexts(canvas);
    const rect = canvas.getBoundingClientRect();
    const g = document.createElement('canvas').getContext('2d');
    const measured = d.texts.map((t) => {
      g.font = `${t.size}px BurninSans`;
      g.fontKerning = 'none';
      const m = g.measureText(t.text);
      const along = m.actualBoundingBoxLeft + m.actualBoundingBoxRight;
      const across = m.actualBoundingBoxAscent + m.actualBoundingBoxDescent;
      return t.upright ? [across, along] : [along, across];
    });
    return { ...d, measured, rect: { left: rect.left, right: rect.right, width: rect.width }, viewport: document.documentElement.clientWidth };
  });
}

for (const [width, density] of [[360, 1], [390, 1], [390, 2], [1024, 1], [1366, 1]]) {
  // Phones tap where a mouse hovers.
  const touch = width <= 390;
  await check(`at ${width} px${density > 1 ? ` (${density} pixels to the CSS pixel)` : ''} no chart text is clipped or overlaps another, each learner is named, and a shortened text reads whole on ${touch ? 'a tap' : 'hover'}`, async () => {
    const ctx = await browser.newContext({ viewport: { width, height: 800 }, deviceScaleFactor: density, acceptDownloads: true, hasTouch: touch });
    try {
      const page = await ctx.newPage();
      await page.goto(url + '/');
      await shownValue(page, defaultName);
      const results = longResults();
      await upload(page, 'long-labels.results.json', JSON.stringify(results));
      await page.waitForSelector('#results:not([hidden])');
      await page.waitForFunction(() => Number(document.getElementById('chart').dataset.series) > 0);
      for (const view of ['cumulative', 'episode', 'difference']) {
        await page.selectOption('#chart-view', view);
        const c = await chartTexts(page);
        const where = `${width} px ×${density}, ${view}`;
        assert(c.texts.length > 5, `${where}: the core placed the chart's texts (${c.texts.length})`);
        // The canvas itself is on screen, not cut by the page.
        assert(c.rect.left >= 0 && c.rect.right <= c.viewport + 0.5, `${where}: the chart is within the page: ${JSON.stringify(c.rect)}`);
        let worst = 0;
        c.texts.forEach((t, i) => {
          assert(t.left >= 0 && t.top >= 0 && t.right <= c.width && t.bottom <= c.height, `${where}: "${t.text}" lies inside the ${c.width}×${c.height} chart: ${JSON.stringify(t)}`);
          // The core's ink box is the browser's own measure of the drawn
          // text (measureText's actual bounding box), which Chrome rounds
          // out to whole pixels at its edges: up to two pixels more along
          // the text and across it.
          const [w, h] = c.measured[i];
          const [along, across] = t.upright ? [h, w] : [w, h];
          const [coreAlong, coreAcross] = t.upright ? [t.bottom - t.top, t.right - t.left] : [t.right - t.left, t.bottom - t.top];
          worst = Math.max(worst, along - coreAlong, across - coreAcross);
          assert(along - coreAlong >= -0.5 && along - coreAlong <= 2 && across - coreAcross >= -0.5 && across - coreAcross <= 2, `${where}: "${t.text}" measures ${along.toFixed(1)} along by ${across.toFixed(1)} across in the browser, ${coreAlong.toFixed(1)} by ${coreAcross.toFixed(1)} in the core`);
          for (const u of c.texts.slice(0, i)) {
            const apart = t.right <= u.left || u.right <= t.left || t.bottom <= u.top || u.bottom <= t.top;
            assert(apart, `${where}: "${t.text}" and "${u.text}" do not overlap: ${JSON.stringify([t, u])}`);
          }
          if (t.text.includes('…')) assert(t.full && t.full.length > t.text.length - 1, `${where}: "${t.text}" is cut and keeps its whole text`);
        });
        if (view === 'cumulative') console.log(`     ${where}: ${c.texts.length} texts, the browser's measure at most ${worst.toFixed(2)} px over the core's boxes`);
        if (view === 'cumulative') {
          // The plot keeps its room beside a legend of five long labels: at
          // least 180 CSS px high at every width (on a phone the legend goes
          // under the plot and the chart grows taller than it is wide).
          const [l, t, r, b] = c.plot.map((v) => v / c.ratio);
          console.log(`     ${where}: plot ${(r - l).toFixed(0)} × ${(b - t).toFixed(0)} CSS px`);
          assert(b - t >= 180, `${where}: the plot is ${(b - t).toFixed(0)} px high, at least 180`);
        }
        if (view !== 'difference') {
          const words = new Set(c.texts.flatMap((t) => t.text.split(' ')));
          for (const label of Object.values(longLabels)) {
            const named = c.texts.some((t) => t.full?.split('; ').includes(label)) || label.split(' ').every((w) => words.has(w));
            assert(named, `${where}: the legend names "${label}" (whole, wrapped, or on hover)`);
          }
        }
        // Every shortened text reads whole on hover (a tap on a phone).
        for (const t of c.texts.filter((t) => t.full)) {
          await page.locator('#chart').scrollIntoViewIfNeeded();
          const box = await page.locator('#chart').boundingBox();
          const [x, y] = [box.x + (t.left + t.right) / 2 / c.ratio, box.y + (t.top + t.bottom) / 2 / c.ratio];
          if (touch) await page.touchscreen.tap(x, y);
          else await page.mouse.move(x, y);
          await page.waitForFunction((full) => { const tip = document.getElementById('chart-tip'); return !tip.hidden && tip.textContent === full; }, t.full, { timeout: 3000 })
            .catch(async () => { throw new Error(`${where}: ${touch ? 'tapping' : 'hovering'} "${t.text}" shows ${JSON.stringify(await page.textContent('#chart-tip'))}, not its whole text ${JSON.stringify(t.full)}`); });
          await page.mouse.move(0, 0);
        }
        if (width <= 390 && density === 1 && view === 'cumulative') {
          assert(c.texts.some((t) => t.full === unbroken), `${where}: the unbreakable label is cut, whole on hover`);
          await page.locator('#chart').screenshot({ path: join(out, `chart-${width}.png`) });
        }
      }
    } finally {
      await ctx.close();
    }
  });
}

// The PNG export (the core's chart drawn on a canvas of the export size)
// against `burnin plot`'s PNG (the core's chart on its bitmap backend,
// glyphs by ab_glyph), in the CLI figures' three views: the same points at
// half-pixel precision and the same antialiased coverage of lines and
// fills, so they differ almost only in text, the browser's glyph
// rasteriser not being ab_glyph's. Measured (share of pixels with some
// channel off by more than 48/255, then 16/255), default view: 1.51% and
// 3.92% before #34 (whole-pixel curves in the page; plotters'
// unantialiased polygons at twice the size in the CLI), 0.41% and 0.88%
// after; log-log with bounds (more text, dotted lines) 0.77% and 1.79%;
// difference 0.43% and 0.89%. The limits, 1% and 2.2%, leave text
// rendering some room to vary and fail the old drawing.
await check('the page\'s PNG export matches `burnin plot`\'s PNG of the same results', async (page) => {
  await openPage(page);
  const file = 'ferry-experiment.json.results.json';
  await upload(page, file, readFileSync(join(out, file), 'utf8'));
  await page.waitForSelector('#results:not([hidden])');
  await page.waitForFunction(() => Number(document.getElementById('chart').dataset.series) > 0);
  // The views and options of the CLI's figures (xtask: FIGURES).
  const views = [
    ['chart', async () => {}],
    ['chart-log', async () => { await page.check('input[name=axes][value=log]'); await page.check('#show-lower'); await page.check('#show-bounds'); }],
    ['chart-difference', async () => { await page.check('input[name=axes][value=linear]'); await page.uncheck('#show-lower'); await page.uncheck('#show-bounds'); await page.selectOption('#chart-view', 'difference'); }],
  ];
  for (const [suffix, set] of views) {
    await set();
    const [dl] = await Promise.all([page.waitForEvent('download'), page.click('#export-png')]);
    const mine = readFileSync(await dl.path());
    writeFileSync(join(out, `page-${suffix}.png`), mine);
    const cli = readFileSync(join(out, `ferry-experiment.json.${suffix}.png`));
    for (const [tol, limit] of [[48, 0.01], [16, 0.022]]) {
      const d = await pngDifference(page, mine, cli, tol);
      assertEqual(JSON.stringify(d.size), '[[1280,720]]', `${suffix}: both are 1280×720`);
      console.log(`     ${suffix} PNG: ${(100 * d.share).toFixed(2)}% of pixels differ by more than ${tol}/255 in some channel (at most ${(100 * limit).toFixed(1)}%)`);
      assert(d.share <= limit, `${suffix}: the page's PNG and burnin plot's: ${(100 * d.share).toFixed(2)}% of pixels differ by more than ${tol}/255, more than ${(100 * limit).toFixed(1)}%`);
    }
  }
});

for (const width of [360, 390, 1366]) {
  const touch = width <= 390;
  await check(`at ${width} px the transition graph's labels keep their size, stay inside the graph and apart, and a cut name reads whole on ${touch ? 'a tap' : 'hover'}`, async () => {
    const ctx = await browser.newContext({ viewport: { width, height: 800 }, deviceScaleFactor: 1, acceptDownloads: true, hasTouch: touch });
    try {
      const page = await ctx.newPage();
      await page.goto(url + '/');
      await shownValue(page, defaultName);
      // A demo model with one state's name longer than a phone's graph has room for.
      const model = await (await fetch(`${url}/demo-models/pearl-reef.json`)).json();
      const long = 'the sheltered west ledge under the cliff, where the oysters grow';
      model.states[2] = long;
      await upload(page, 'long-names.json', JSON.stringify(model));
      await shownValue(page, model.name);
      await page.click('#tab-graph');
      await page.waitForFunction((n) => document.querySelectorAll('#graph-box g.node').length === n, model.states.length);
      const labels = () => page.evaluate(() => {
        const box = document.getElementById('graph-box').getBoundingClientRect();
        return { box: { left: box.left, right: box.right, top: box.top, bottom: box.bottom }, labels: [...document.querySelectorAll('#graph-box g.node')].map((g) => {
          const t = g.querySelector('text');
          const r = t.getBoundingClientRect();
          // The size on screen: the font size times the drawing's scale.
          const spans = [...t.querySelectorAll('tspan')].map((x) => x.textContent);
          return { state: Number(g.dataset.state), text: spans.length ? spans.join(' ') : t.textContent, title: g.querySelector('title')?.textContent, px: Number(t.getAttribute('font-size')) * t.getScreenCTM().a, left: r.left, right: r.right, top: r.top, bottom: r.bottom };
        }) };
      });
      const { box, labels: ls } = await labels();
      ls.forEach((l, i) => {
        assert(l.px >= 12, `${width} px: "${l.text}" is drawn at ${l.px.toFixed(1)} px (at least 12)`);
        assert(l.left >= box.left && l.right <= box.right, `${width} px: "${l.text}" lies inside the graph: ${JSON.stringify({ l, box })}`);
        assertEqual(l.title, model.states[l.state], `${width} px: node ${l.state}'s tooltip names it whole`);
        assert(l.text === model.states[l.state] || (l.text.endsWith('…') && model.states[l.state].startsWith(l.text.slice(0, -1))), `${width} px: "${l.text}" is the state's name or its start`);
        for (const m of ls.slice(0, i)) {
          assert(l.right <= m.left || m.right <= l.left || l.bottom <= m.top || m.bottom <= l.top, `${width} px: "${l.text}" and "${m.text}" do not overlap`);
        }
      });
      const cut = ls.find((l) => l.state === 2);
      assert(cut.text !== long && cut.text.endsWith('…'), `${width} px: the long name is cut (${cut.text})`);
      // A tap on the node (or the pointer over it) shows the whole name.
      const node = page.locator('#graph-box [data-state="2"] circle');
      if (touch) await node.tap();
      else await node.hover();
      await page.waitForTimeout(300);
      const shown = (await labels()).labels.find((l) => l.state === 2);
      assertEqual(shown.text, long, `${width} px: the ${touch ? 'tapped' : 'hovered'} node shows its whole name`);
      assert(shown.left >= box.left && shown.right <= box.right, `${width} px: the whole name lies inside the graph: ${JSON.stringify(shown)}`);
      if (width === 390) await page.locator('#graph-box').screenshot({ path: join(out, 'graph-390.png') });
    } finally {
      await ctx.close();
    }
  });
}
