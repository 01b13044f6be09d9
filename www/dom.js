// DOM helpers shared by the views. Text always goes in as textContent.

/** An element with text (as textContent, never HTML) and attributes. */
export function el(tag, text, attrs = {}) {
  const e = document.createElement(tag);
  if (text !== undefined && text !== null) e.textContent = text;
  for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, v);
  return e;
}
