// How long a run has left, from what each learner has cost so far: learners
// differ in speed by three orders of magnitude (BENCHMARKS.md), so an
// estimate from the overall rate is wrong whenever a slow learner is still
// to come.

/**
 * totals[l]: episodes learner l has to run in all; measured[l]: {episodes, ms}
 * it has run so far (summed over workers); workers: how many run at once.
 * Returns {seconds, atLeast}: `atLeast` when some learner has not been
 * measured yet (it is counted at the slowest rate seen, which may be too
 * fast), and seconds = null before anything was measured.
 */
export function timeLeft(totals, measured, workers) {
  const rates = totals.map((_, l) => {
    const m = measured[l];
    return m && m.episodes > 0 ? m.ms / m.episodes : null;
  });
  const known = rates.filter((r) => r !== null);
  if (!known.length) return { seconds: null, atLeast: true };
  const slowest = Math.max(...known);
  let ms = 0;
  let atLeast = false;
  totals.forEach((total, l) => {
    const left = Math.max(0, total - (measured[l]?.episodes || 0));
    if (left === 0) return;
    if (rates[l] === null) atLeast = true;
    ms += left * (rates[l] ?? slowest);
  });
  return { seconds: ms / 1000 / Math.max(1, workers), atLeast };
}
