// A uniform guest learner for the page: "Add your learner…" and choose this
// file. It plays every action with probability 1/A and never changes its
// mind: the first answer gives the probability table, every later one says
// "keep". Contract: docs/formats.md, "Guest learners".

/** Episodes asked for per answer (1: the page hands over every episode). */
const BATCH = 1;

export default function start(intro) {
  const { states, actions, horizon } = intro;
  const row = new Array(actions).fill(1 / actions);
  const table = Array.from({ length: horizon }, () => Array.from({ length: states }, () => row));
  return {
    decide(batch) {
      // batch.done = 0 before the first episode; afterwards the trajectories of
      // the last batch are in batch.states, .actions, .rewards, .next.
      return batch.done === 0 ? { probabilities: table, episodes: BATCH } : { keep: true, episodes: BATCH };
    },
  };
}
