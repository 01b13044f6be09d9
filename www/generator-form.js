// The generator form: one field per parameter of the chosen kind, built from
// the core's catalogue of generators (src/generate/catalog.rs): names,
// defaults, ranges and help all come from there.
import { el } from './dom.js';

/**
 * Fills `kindSelect` with the catalogue's generators and `paramsBox` with the
 * chosen one's parameters; returns a function giving the generator object
 * the form describes (what a file's "generator" holds).
 */
export function initGeneratorForm(kindSelect, paramsBox, generators) {
  const byKind = new Map(generators.map((g) => [g.kind, g]));
  for (const g of generators) kindSelect.append(el('option', g.name, { value: g.kind, title: g.source }));
  const render = () => {
    const g = byKind.get(kindSelect.value);
    paramsBox.replaceChildren();
    const params = g.params.slice();
    if (g.seeded) params.push({ name: 'seed', kind: 'whole', default: 1, min: 0, max: 2 ** 53, help: 'seed of the generator’s random draws' });
    for (const p of params) {
      const input = el('input', null, { name: p.name, id: `gen-${p.name}`, title: p.help, 'data-kind': p.kind });
      if (p.kind === 'flag') {
        input.type = 'checkbox';
        input.checked = p.default !== 0;
      } else if (p.kind === 'numbers') {
        input.type = 'text';
        input.placeholder = 'comma-separated, or empty';
      } else {
        input.type = 'number';
        input.step = p.kind === 'number' ? 'any' : '1';
        input.min = String(p.min);
        input.max = String(p.max);
        if (p.kind === 'optional-whole') input.placeholder = g.seeded ? 'from the seed' : 'default';
        else input.value = String(p.default);
      }
      const label = el('label', p.name.replace(/_/g, ' '), { title: p.help });
      label.htmlFor = input.id;
      paramsBox.append(label, input);
    }
  };
  kindSelect.addEventListener('change', render);
  render();
  return () => {
    const spec = { kind: kindSelect.value };
    for (const input of paramsBox.querySelectorAll('input')) {
      const kind = input.dataset.kind;
      if (kind === 'flag') spec[input.name] = input.checked;
      else if (kind === 'numbers') {
        const xs = input.value.split(/[,\s]+/).filter(Boolean).map(Number);
        if (xs.length) spec[input.name] = xs;
      } else if (input.value !== '' || kind !== 'optional-whole') spec[input.name] = Number(input.value);
    }
    return spec;
  };
}

/** The numeric parameters of a generator object's kind that a sweep can vary. */
export function sweepableParams(generators, spec) {
  const g = spec && generators.find((x) => x.kind === spec.kind);
  return g ? g.params.filter((p) => p.kind !== 'flag' && p.kind !== 'numbers') : [];
}
