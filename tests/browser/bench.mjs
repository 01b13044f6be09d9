// The browser side of `cargo xtask bench`: the wasm core's workloads in
// headless Chromium (www/bench.html), with each learner's workload run in
// rounds interleaved with the native CLI's, so that the two sides of every
// ratio are measured within seconds of each other on a shared machine.
//
// Environment (set by `cargo xtask bench`):
//   BURNIN_URL, BURNIN_CHROMIUM  the served www/ and the browser
//   BURNIN_QUICK                 smaller workloads
//   BURNIN_ONLY                  one learner only, no native runs (a quick look)
//   BURNIN_CLI                   the native `burnin` binary, for the interleaved rounds
//   BURNIN_PAIRS                 learners to run in rounds (comma-separated keys)
//   BURNIN_ROUNDS                rounds per learner (3; 1 for psrl, whose runs are long)
//   BURNIN_PAIRS_OUT             where to write one TSV line per round:
//                                key, native rate, wasm rate, native checksum, wasm checksum
//   BURNIN_NUMPY                 "python3 SCRIPT MODEL EPISODES": run once per
//                                ucbvi-hoeffding round; its rate is a sixth column
//   BURNIN_GUEST_MODEL           the learning workload's model file: time a guest
//                                learner module (examples/uniform.mjs) against the
//                                built-in uniform learner in the page, in rounds
//   BURNIN_GUEST_OUT             where to write one TSV line per round: guest rate, built-in rate
//   BURNIN_POOL_EXPERIMENT       an experiment's text (its model inline): run it with the
//                                page's own runExperiment on 1 worker and on 2, in
//                                interleaved pairs after a warm-up run
//   BURNIN_POOL_OUT              where to write one TSV line per pair: ms on 1, ms on 2
//   BURNIN_RESEARCH              learners to run at research scale (comma-separated keys),
//                                each natively (`burnin bench --research --only KEY`, its
//                                own process) and then in a page of its own (its own heap)
//   BURNIN_RESEARCH_OUT          where to write one TSV line per learner: key, native rate,
//                                native peak RSS bytes, wasm rate, wasm heap bytes, native note, wasm note
// Prints the wasm figures (JSON) of the solver and replanning workloads, or
// of BURNIN_ONLY's learner.
import { execFileSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { chromium } from 'playwright-core';

const env = process.env;
const quick = Boolean(env.BURNIN_QUICK);
const browser = await chromium.launch({
  executablePath: env.BURNIN_CHROMIUM || '/usr/bin/chromium',
  args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
    '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});
const page = await browser.newPage();
page.on('pageerror', (e) => { console.error(e.message); process.exit(1); });
await page.goto(`${env.BURNIN_URL}/bench.html?manual`);
const wasm = (request) => page.evaluate((r) => window.benchRun(r), request);
/** The best rate and the checksum of the one learning (or floor) figure in `json`. */
const learned = (json) => {
  const f = JSON.parse(json).figures.find((x) => x.name.startsWith('learn ') || x.name.startsWith('floor '));
  return { rate: f.best, note: f.note };
};

if (env.BURNIN_ONLY) {
  process.stdout.write(await wasm({ quick, only: env.BURNIN_ONLY }));
} else {
  process.stdout.write(await wasm({ quick, noLearners: true }));
  const lines = [];
  for (const key of (env.BURNIN_PAIRS || '').split(',').filter(Boolean)) {
    const rounds = key === 'psrl' ? 1 : Number(env.BURNIN_ROUNDS || 3);
    for (let i = 0; i < rounds; i++) {
      const args = ['bench', '--only', key, ...(quick ? ['--quick'] : [])];
      const n = learned(execFileSync(env.BURNIN_CLI, args, { encoding: 'utf8' }));
      const w = learned(await wasm({ quick, only: key }));
      const row = [key, n.rate, w.rate, n.note, w.note];
      if (key === 'ucbvi-hoeffding' && env.BURNIN_NUMPY) {
        const [cmd, ...rest] = env.BURNIN_NUMPY.split(' ');
        row.push(JSON.parse(execFileSync(cmd, rest, { encoding: 'utf8' })).episodes_per_second);
      }
      lines.push(row.join('\t'));
      console.error(row.join('\t'));
    }
  }
  writeFileSync(env.BURNIN_PAIRS_OUT, lines.join('\n') + '\n');
}
if (env.BURNIN_GUEST_MODEL) {
  const model = readFileSync(env.BURNIN_GUEST_MODEL, 'utf8');
  const source = readFileSync(new URL('../../examples/uniform.mjs', import.meta.url), 'utf8');
  const text = (learner) => `{"format": "burnin-experiment", "version": 1, "episodes": ${quick ? 20000 : 200000}, "seeds": 1,
    "learners": [${learner}], "model": ${model}}`;
  const texts = [text('{"guest": "trivial"}'), text('{"algorithm": "uniform"}')];
  const lines = [];
  for (let i = 0; i < 3; i++) {
    const r = JSON.parse(await wasm({ guest: { texts, source } }));
    lines.push(`${r.guest}\t${r.builtin}`);
    console.error(`guest\t${r.guest}\t${r.builtin}`);
  }
  writeFileSync(env.BURNIN_GUEST_OUT, lines.join('\n') + '\n');
}
if (env.BURNIN_POOL_EXPERIMENT) {
  const text = readFileSync(env.BURNIN_POOL_EXPERIMENT, 'utf8');
  // From "Run" to the merged results, as the page's own run does it.
  const timed = (workers) => page.evaluate(async ({ text, workers }) => {
    const { runExperiment } = await import('./compute.js');
    const t = performance.now();
    const r = await runExperiment(text, null, workers).promise;
    if (!r.json) throw new Error(`the pool's run failed: ${JSON.stringify(r).slice(0, 300)}`);
    return performance.now() - t;
  }, { text, workers });
  await timed(2);
  const lines = [];
  for (let i = 0; i < Number(env.BURNIN_POOL_PAIRS || 5); i++) {
    const row = [await timed(1), await timed(2)];
    lines.push(row.join('\t'));
    console.error(`pool\t${row.join('\t')}`);
  }
  writeFileSync(env.BURNIN_POOL_OUT, lines.join('\n') + '\n');
}
if (env.BURNIN_RESEARCH) {
  const lines = [];
  const one = (json) => {
    const j = JSON.parse(json);
    const f = j.figures.find((x) => x.name.startsWith('research '));
    return { rate: f.best, note: f.note, memory: j.peak_memory_bytes };
  };
  for (const key of env.BURNIN_RESEARCH.split(',').filter(Boolean)) {
    const n = one(execFileSync(env.BURNIN_CLI, ['bench', '--research', '--only', key], { encoding: 'utf8' }));
    const fresh = await browser.newPage();
    await fresh.goto(`${env.BURNIN_URL}/bench.html?manual`);
    const w = one(await fresh.evaluate((r) => window.benchRun(r), { research: true, only: key }));
    await fresh.close();
    const row = [key, n.rate, n.memory, w.rate, w.memory, n.note, w.note];
    lines.push(row.join('\t'));
    console.error(row.join('\t'));
  }
  writeFileSync(env.BURNIN_RESEARCH_OUT, lines.join('\n') + '\n');
}
await browser.close();
