// A guest that checks what docs/formats.md and the "Add your learner…"
// dialog say each decide receives: the first call before any episode with
// done = 0, episodes = 0 and empty arrays; every later one the episode just
// run (it asks for one episode per answer). It throws, naming what it got,
// when a call differs, so the run lists it as failed.
export default function start(intro) {
  const { states, horizon } = intro;
  const policy = { actions: Array.from({ length: horizon }, () => new Array(states).fill(0)) };
  let calls = 0;
  const shape = (b) => JSON.stringify({
    done: b.done,
    episodes: b.episodes,
    horizon: b.horizon,
    lengths: [b.states.length, b.actions.length, b.rewards.length, b.next.length],
  });
  return {
    decide(batch) {
      calls += 1;
      const k = calls - 1;
      const want = JSON.stringify({ done: k, episodes: k === 0 ? 0 : 1, horizon, lengths: new Array(4).fill(k === 0 ? 0 : horizon) });
      if (shape(batch) !== want) throw new Error(`call ${calls}: got ${shape(batch)}, want ${want}`);
      return k === 0 ? policy : { keep: true };
    },
  };
}
