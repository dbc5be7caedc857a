// Building the page from plain data, one way for every module: elements with their properties and
// children (text is never parsed as HTML), and files handed to the user to save.

/** The children that are there: a `cond ? child : null` (or `cond && child`) leaves nothing. */
export function present(children) {
  return children.filter((child) => child !== null && child !== undefined && child !== false);
}

/** Build an element: `h('td', { className: 'x' }, 'text', child, …)`. Text is never parsed as HTML. */
export function h(tag, props = {}, ...children) {
  const element = Object.assign(document.createElement(tag), props);
  element.append(...present(children));
  return element;
}

/** Save `text` as a file called `name`. */
export function download(name, text, type) {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const link = h('a', { href: url, download: name });
  document.body.append(link);
  link.click();
  link.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}
