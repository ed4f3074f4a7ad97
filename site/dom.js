// The one helper for building the page's elements.

/**
 * el returns a new element: tag, its attributes (set as given) and an
 * optional text content.
 */
export function el(tag, attrs = {}, text) {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) e.setAttribute(k, v);
  if (text != null) e.textContent = text;
  return e;
}
