// The transition graph: states as nodes, the chosen step's transitions as
// arrows (width by probability, colour by action), nodes draggable (or moved
// with the arrow keys) with their positions kept in the model's layout.

const NS = 'http://www.w3.org/2000/svg';
// The drawing is as wide as its box in CSS pixels (1000 while the box is
// hidden), so type keeps its size on a phone rather than shrinking with a
// fixed-width picture (#34); 520 px high, as the box.
const H = 520, M = 60, R = 16;
/** Node labels: their size, and the widest a label may be before it is cut (whole on hover or focus). */
const LABEL_SIZE = 13, LABEL_MAX = 160;
/** Largest model drawn as a graph. */
const MAX_NODES = 80;
const $ = (id) => document.getElementById(id);

function svg(tag, attrs = {}, text) {
  const e = document.createElementNS(NS, tag);
  for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, String(v));
  if (text !== undefined) e.textContent = text;
  return e;
}

export class GraphView {
  /** onLayout(positions): the user moved a node. */
  constructor(onLayout) {
    this.onLayout = onLayout;
    this.doc = null;
    /** Action colours: the core's series palette (set from the catalogue at start). */
    this.palette = ['#5d676b'];
    $('graph-step').addEventListener('input', () => { $('graph-step-shown').textContent = $('graph-step').value; this.render(); });
    $('graph-policy').addEventListener('change', () => this.render());
    // Drawn again at a new width (the tab shown, the window turned).
    this.width = 0;
    new ResizeObserver(() => {
      const w = $('graph-box').clientWidth;
      if (w > 0 && w !== this.width && this.doc) this.render();
    }).observe($('graph-box'));
  }

  show(doc, solution) {
    this.doc = doc;
    this.solution = solution;
    const S = doc.states.length;
    if (!doc.layout || !Array.isArray(doc.layout.positions) || doc.layout.positions.length !== S) {
      // A circle, starting at the top.
      this.positions = doc.states.map((_, i) => [Math.sin((2 * Math.PI * i) / S), -Math.cos((2 * Math.PI * i) / S)]);
    } else {
      this.positions = doc.layout.positions.map((p) => [p[0], -p[1]]);
    }
    const step = $('graph-step');
    step.max = String(solution.stationary ? 1 : solution.horizon);
    step.value = '1';
    step.disabled = solution.stationary;
    $('graph-step-shown').textContent = '1';
    this.render();
  }

  /** Model coordinates ↔ the SVG's viewBox, fixed for one rendering. */
  frame() {
    const W = this.drawnWidth;
    const xs = this.positions.map((p) => p[0]), ys = this.positions.map((p) => p[1]);
    const [x0, x1, y0, y1] = [Math.min(...xs), Math.max(...xs), Math.min(...ys), Math.max(...ys)];
    const k = Math.min((W - 2 * M) / Math.max(x1 - x0, 1e-9), (H - 2 * M) / Math.max(y1 - y0, 1e-9));
    const cx = (W - k * (x1 - x0)) / 2, cy = (H - k * (y1 - y0)) / 2;
    const to = (p) => [cx + (p[0] - x0) * k, cy + (p[1] - y0) * k];
    const from = (q) => [(q[0] - cx) / k + x0, (q[1] - cy) / k + y0];
    return { to, from };
  }

  render() {
    const box = $('graph-box');
    const d = this.doc;
    if (!d) return;
    const S = d.states.length, A = d.actions.length;
    if (S > MAX_NODES) {
      box.replaceChildren(Object.assign(document.createElement('p'), { className: 'caption', textContent: `This model has ${S} states; the graph is drawn for at most ${MAX_NODES}.` }));
      $('graph-legend').replaceChildren();
      return;
    }
    const h = Number($('graph-step').value) - 1;
    const step = d.steps[d.stationary ? 0 : h];
    const policy = $('graph-policy').checked && this.solution ? this.solution.policy : null;
    const W = box.clientWidth || 1000;
    this.width = box.clientWidth;
    this.drawnWidth = W;
    const f = this.frame();
    this.fr = f;
    const root = svg('svg', { viewBox: `0 0 ${W} ${H}`, role: 'img', 'aria-label': `Transition graph of ${d.name || 'the model'} at step ${h + 1}` });
    const defs = svg('defs');
    for (let a = 0; a < A; a++) {
      const m = svg('marker', { id: `arrow${a}`, viewBox: '0 0 10 10', refX: 9, refY: 5, markerWidth: 11, markerHeight: 11, markerUnits: 'userSpaceOnUse', orient: 'auto' });
      m.append(svg('path', { d: 'M0,0 L10,5 L0,10 z', fill: this.palette[a % this.palette.length] }));
      defs.append(m);
    }
    root.append(defs);
    const edges = svg('g');
    for (let s = 0; s < S; s++) {
      const p = f.to(this.positions[s]);
      for (let a = 0; a < A; a++) {
        const on = !policy || policy[h * S + s] === a;
        for (const [t, prob] of step.transitions[s][a]) {
          if (!(prob > 0)) continue;
          const q = f.to(this.positions[t]);
          const colour = this.palette[a % this.palette.length];
          const width = (1 + 5 * prob) * (on && policy ? 1.4 : 1);
          const attrs = { fill: 'none', stroke: colour, 'stroke-width': width, opacity: on ? 0.8 : 0.1, 'marker-end': `url(#arrow${a})`, 'data-edge': `${s}-${a}-${t}` };
          let dPath;
          if (t === s) {
            // A loop leaving and re-entering the node, one direction per action.
            const ang = -Math.PI / 2 + (a - (A - 1) / 2) * 0.9;
            const at = (t, r) => [p[0] + Math.cos(t) * r, p[1] + Math.sin(t) * r];
            const [b, e] = [at(ang - 0.45, R), at(ang + 0.45, R + 3)];
            const [c1, c2] = [at(ang - 0.55, R * 3.4), at(ang + 0.55, R * 3.4)];
            dPath = `M${b[0]},${b[1]} C${c1[0]},${c1[1]} ${c2[0]},${c2[1]} ${e[0]},${e[1]}`;
          } else {
            const [dx, dy] = [q[0] - p[0], q[1] - p[1]];
            const len = Math.hypot(dx, dy) || 1;
            const [nx, ny] = [-dy / len, dx / len];
            const bend = 18 + 14 * a;
            const [mx, my] = [(p[0] + q[0]) / 2 + nx * bend, (p[1] + q[1]) / 2 + ny * bend];
            const shrink = (from, to) => { const v = [to[0] - from[0], to[1] - from[1]]; const l = Math.hypot(v[0], v[1]) || 1; return [from[0] + (v[0] / l) * (R + 3), from[1] + (v[1] / l) * (R + 3)]; };
            const st = shrink(p, [mx, my]), en = shrink(q, [mx, my]);
            dPath = `M${st[0]},${st[1]} Q${mx},${my} ${en[0]},${en[1]}`;
          }
          const path = svg('path', { d: dPath, ...attrs });
          path.append(svg('title', {}, `${d.states[s]} —${d.actions[a]}→ ${d.states[t]}: ${prob}`));
          edges.append(path);
        }
      }
    }
    root.append(edges);
    const nodes = svg('g');
    const start = d.start || [];
    for (let s = 0; s < S; s++) {
      const [x, y] = f.to(this.positions[s]);
      const g = svg('g', { class: 'node', transform: `translate(${x},${y})`, tabindex: 0, role: 'button', 'aria-label': `state ${d.states[s]}; arrow keys move it`, 'data-state': s });
      g.append(svg('title', {}, d.states[s]));
      g.append(svg('circle', { r: R, fill: start[s] > 0 ? '#f3d9cd' : '#fffdf8', stroke: '#1e282d', 'stroke-width': 1.5 }));
      g.append(svg('text', { y: R + 15, 'text-anchor': 'middle', 'font-size': LABEL_SIZE, fill: '#1e282d', stroke: '#fffdf8', 'stroke-width': 3, 'paint-order': 'stroke', class: 'node-label' }, d.states[s]));
      this.drag(g, s);
      nodes.append(g);
    }
    root.append(nodes);
    box.replaceChildren(root);
    this.fitLabels(root, W);
    const legend = $('graph-legend');
    legend.replaceChildren();
    d.actions.forEach((name, a) => {
      const li = document.createElement('li');
      const sw = document.createElement('span');
      sw.className = 'swatch';
      sw.style.background = this.palette[a % this.palette.length];
      const label = document.createElement('span');
      label.textContent = name;
      li.append(sw, label);
      legend.append(li);
    });
  }

  /**
   * Node labels at their own size, each cut with an ellipsis to the room
   * beside its neighbours on the same level (LABEL_MAX at most) and kept
   * inside the drawing; the whole name shows while the node is hovered or
   * focused (a tap focuses it), and in its tooltip.
   */
  fitLabels(root, W) {
    const groups = [...root.querySelectorAll('g.node')];
    const at = groups.map((g) => this.fr.to(this.positions[Number(g.dataset.state)]));
    groups.forEach((g, i) => {
      const text = g.querySelector('text');
      const full = text.textContent;
      // Room: up to the nearest node whose label is on about the same line.
      let room = Math.min(LABEL_MAX, W - 8);
      at.forEach((q, j) => { if (j !== i && Math.abs(q[1] - at[i][1]) < LABEL_SIZE * 1.6) room = Math.min(room, Math.max(2 * R, Math.abs(q[0] - at[i][0]) - 8)); });
      const place = (shown) => {
        text.textContent = shown;
        const x = at[i][0];
        // Inside the drawing: shifted from the node's centre if need be.
        const inside = (w) => Math.min(Math.max(x - w / 2, 4), W - 4 - w) + w / 2 - x;
        if (text.getComputedTextLength() <= W - 8) {
          text.setAttribute('x', String(inside(text.getComputedTextLength())));
          return;
        }
        // A whole name wider than the drawing: on as many lines as it takes.
        const lines = [];
        for (const word of shown.split(' ')) {
          const next = lines.length ? `${lines[lines.length - 1]} ${word}` : word;
          text.textContent = next;
          if (lines.length && text.getComputedTextLength() <= W - 8) lines[lines.length - 1] = next;
          else if (lines.length) lines.push(word);
          else lines[0] = word;
        }
        text.textContent = '';
        text.removeAttribute('x');
        lines.forEach((line, k) => {
          const span = svg('tspan', { dy: k ? LABEL_SIZE * 1.2 : 0 }, line);
          text.append(span);
          span.setAttribute('x', String(inside(span.getComputedTextLength())));
        });
      };
      let shown = full;
      text.textContent = full;
      if (text.getComputedTextLength() > room) {
        const chars = [...full];
        let n = chars.length;
        do { n--; text.textContent = chars.slice(0, n).join('') + '…'; } while (n > 1 && text.getComputedTextLength() > room);
        shown = text.textContent;
      }
      place(shown);
      g.dataset.label = shown;
      if (shown === full) return;
      const whole = () => { place(full); if (g.nextSibling) g.parentNode.append(g); };
      const cut = () => { if (document.activeElement !== g && !g.matches(':hover')) place(shown); };
      g.addEventListener('pointerenter', whole);
      g.addEventListener('focus', whole);
      g.addEventListener('pointerleave', cut);
      g.addEventListener('blur', cut);
    });
  }

  /** Dragging with a pointer, or moving with the arrow keys, then saving the layout. */
  drag(g, s) {
    const root = () => g.ownerSVGElement;
    const toView = (e) => {
      const pt = root().createSVGPoint();
      pt.x = e.clientX; pt.y = e.clientY;
      const q = pt.matrixTransform(root().getScreenCTM().inverse());
      return [q.x, q.y];
    };
    g.addEventListener('pointerdown', (e) => {
      g.setPointerCapture(e.pointerId);
      const f = this.fr;
      const move = (ev) => {
        const [x, y] = toView(ev);
        g.setAttribute('transform', `translate(${x},${y})`);
        this.positions[s] = f.from([x, y]);
      };
      const up = () => {
        g.removeEventListener('pointermove', move);
        g.removeEventListener('pointerup', up);
        this.commit();
      };
      g.addEventListener('pointermove', move);
      g.addEventListener('pointerup', up);
    });
    g.addEventListener('keydown', (e) => {
      const step = { ArrowLeft: [-1, 0], ArrowRight: [1, 0], ArrowUp: [0, -1], ArrowDown: [0, 1] }[e.key];
      if (!step) return;
      e.preventDefault();
      const [x, y] = this.fr.to(this.positions[s]);
      this.positions[s] = this.fr.from([x + step[0] * 12, y + step[1] * 12]);
      this.commit();
      $('graph-box').querySelector(`[data-state="${s}"]`)?.focus();
    });
  }

  commit() {
    const positions = this.positions.map((p) => [Math.round(p[0] * 1000) / 1000, Math.round(-p[1] * 1000) / 1000]);
    this.doc.layout = { positions };
    this.onLayout(positions);
    this.render();
  }
}
