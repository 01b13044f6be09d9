// Browser checks of the Burnin page in Debian's headless Chromium.
// Run by `cargo xtask test`, which serves www/ and passes:
//   BURNIN_URL       the served page
//   BURNIN_CHROMIUM  the Chromium binary
//   BURNIN_EXPECTED  JSON {demo file: optimal_value from `burnin solve --json`}
//   BURNIN_OUT       folder for screenshots; it also holds `<fixture>.results.json`,
//                    what `burnin run --json` printed for each fixtures/*-experiment.json,
//                    and `burnin plot`'s figures (SVG and PNG) of the ferry fixture's results
//   BURNIN_DIST_URL, BURNIN_DIST_DIR, BURNIN_DIST_NEXT, BURNIN_VERSION  the published site (checks/site.mjs)
// BURNIN_ONLY=TEXT runs only the checks whose name contains TEXT, or the view named TEXT.
//
// Each view's checks live in a file of their own under checks/, with what
// they share in checks/helpers.mjs; a check's line names its view, and a
// failing one its file too. The views run in this order, each check in a
// fresh browser context.
import { finish } from './checks/helpers.mjs';

const VIEWS = ['solution', 'experiment', 'results', 'guide', 'table1', 'library', 'share', 'editor', 'layout', 'charts', 'graph', 'guests', 'site'];

for (const view of VIEWS) await import(`./checks/${view}.mjs`);
await finish();
