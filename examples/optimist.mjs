// Count-based optimist, the page's version of examples/optimist.py (same
// rule, same bonus): per step h and pair (s, a) it keeps the visit count,
// the reward sum and the successor counts, and acts greedily on
//
//   Q_h(s,a) = min(H − h, r̂ + Σ P̂(s')·V_{h+1}(s') + c·(H − h)·√(L / n)),
//   L = ln(6·S·A·H·K/δ),  a pair never tried being worth H − h,
//
// (ties to the lowest action). It replans only when some pair's count
// reaches twice its count at the last plan (the doubling idea of Auer,
// Jaksch & Ortner, JMLR 11, 2010, in a simpler form of our own) and
// otherwise keeps its policy. Contract: docs/formats.md, "Guest learners".

/** The bonus scale c. */
const SCALE = 0.2;

export default function start(intro) {
  const { states: S, actions: A, horizon: H, episodes: K, delta } = intro;
  const L = Math.log((6 * S * A * H * K) / delta);
  const rows = H * S * A;
  const n = new Float64Array(rows);
  const reward = new Float64Array(rows);
  const planned = new Float64Array(rows);
  const succ = Array.from({ length: rows }, () => new Map());
  const row = (h, s, a) => (h * S + s) * A + a;

  function plan() {
    let vNext = new Float64Array(S);
    const actions = [];
    for (let h = H - 1; h >= 0; h--) {
      const cap = H - h;
      const v = new Float64Array(S);
      const act = new Array(S).fill(0);
      for (let s = 0; s < S; s++) {
        let best = -1;
        for (let a = 0; a < A; a++) {
          const r = row(h, s, a);
          let q = cap;
          if (n[r] > 0) {
            let next = 0;
            for (const [t, c] of succ[r]) next += c * vNext[t];
            q = Math.min(cap, reward[r] / n[r] + next / n[r] + SCALE * cap * Math.sqrt(L / n[r]));
          }
          if (q > best) { best = q; act[s] = a; }
        }
        v[s] = best;
      }
      vNext = v;
      actions.push(act);
    }
    planned.set(n);
    return actions.reverse();
  }

  return {
    decide(batch) {
      if (batch.done === 0) return { actions: plan() };
      let replan = false;
      for (let i = 0; i < batch.states.length; i++) {
        const h = i % H;
        const r = row(h, batch.states[i], batch.actions[i]);
        n[r] += 1;
        reward[r] += batch.rewards[i];
        const m = succ[r];
        m.set(batch.next[i], (m.get(batch.next[i]) || 0) + 1);
        if (n[r] >= 2 * Math.max(1, planned[r])) replan = true;
      }
      return replan ? { actions: plan() } : { keep: true };
    },
  };
}
