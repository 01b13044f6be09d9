// Learner modules that break the contract, for the page's checks in
// tests/browser/check.mjs. Each answers the first request with a fixed
// policy and then, at its second answer, does what BURNIN_HOW says; the
// check writes the value into a copy of this file before loading it.
const HOW = 'BURNIN_HOW';

export default function start(intro) {
  const { states: S, actions: A, horizon: H } = intro;
  return {
    decide(batch) {
      if (batch.done === 0) return { actions: Array.from({ length: H }, () => new Array(S).fill(0)) };
      if (HOW === 'throw') throw new Error('the learner divided by zero');
      if (HOW === 'malformed') return { actions: Array.from({ length: H }, () => new Array(S).fill(A)) };
      if (HOW === 'silent') for (;;) { /* never answers */ }
      // The contract's largest batch of episodes, 2²⁰, over 2²⁰ steps when H > 1.
      if (HOW === 'huge-batch') return { keep: true, episodes: 1 << 20 };
      return { keep: true };
    },
  };
}
