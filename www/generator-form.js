// The generator form: one field per parameter of the chosen kind, with the
// defaults of the Rust generators (src/generate/mod.rs).

export const KINDS = {
  random: { label: 'Random sparse (Garnet-style)', params: { states: 10, actions: 3, successors: 3, horizon: 10, time_dependent: false, fixed_rewards: false } },
  river: { label: 'River chain', params: { states: 6, horizon: 20, p_forward: 0.3, p_back: 0.1, small_reward: 0.005, big_reward: 1 } },
  grid: { label: 'Slippery grid', params: { width: 4, height: 4, slip: 0.1, horizon: 12, goal_reward: 1 } },
  lock: { label: 'Combination lock', params: { horizon: 6, actions: 2, time_dependent: false } },
  'lower-bound': { label: 'Lower-bound instance', params: { actions: 2, depth: 2, horizon: 10, wait_until: 3, epsilon: 0.2 } },
  bandit: { label: 'Bernoulli bandit', params: { arms: 5 } },
};

const SEEDED = new Set(['random', 'lock', 'lower-bound', 'bandit']);

export function initGeneratorForm(kindSelect, paramsBox) {
  for (const [k, v] of Object.entries(KINDS)) {
    const o = document.createElement('option');
    o.value = k;
    o.textContent = v.label;
    kindSelect.append(o);
  }
  const render = () => {
    const kind = kindSelect.value;
    const params = { ...KINDS[kind].params };
    if (SEEDED.has(kind)) params.seed = 1;
    paramsBox.replaceChildren();
    for (const [name, def] of Object.entries(params)) {
      const label = document.createElement('label');
      const input = document.createElement('input');
      input.name = name;
      input.id = `gen-${name}`;
      if (typeof def === 'boolean') {
        input.type = 'checkbox';
        input.checked = def;
      } else {
        input.type = 'number';
        input.step = 'any';
        input.value = String(def);
      }
      label.htmlFor = input.id;
      label.textContent = name.replace(/_/g, ' ');
      paramsBox.append(label, input);
    }
  };
  kindSelect.addEventListener('change', render);
  render();
  /** The generator object the form describes. */
  return () => {
    const spec = { kind: kindSelect.value };
    for (const input of paramsBox.querySelectorAll('input')) {
      spec[input.name] = input.type === 'checkbox' ? input.checked : Number(input.value);
    }
    return spec;
  };
}
