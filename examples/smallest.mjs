// The smallest complete learner module: it plays action 0 everywhere and
// never learns. Contract: docs/formats.md, "Guest learners".
export default function start(intro) {
  // intro: {states, actions, horizon, episodes, delta, seed, state_labels, action_labels, …}
  const first = Array.from({ length: intro.horizon }, () => new Array(intro.states).fill(0));
  return {
    decide(batch) {
      // The first call comes before any episode: batch.done = 0,
      // batch.episodes = 0 and batch.states, .actions, .rewards, .next are
      // empty. Its answer must be a policy ("keep" is refused there).
      if (batch.done === 0) return { actions: first };
      // Later calls: the batch.episodes episodes just run, H steps each.
      return { keep: true };
    },
  };
}
