// Small DOM helpers. Nothing here writes HTML strings or style attributes (the page runs under
// a strict content security policy); styles set from script go through element.style.

const SVG_NS = "http://www.w3.org/2000/svg";

function apply(el, props) {
  for (const [key, value] of Object.entries(props || {})) {
    if (value === undefined || value === null || value === false) continue;
    if (key === "class") el.setAttribute("class", value);
    else if (key === "text") el.textContent = value;
    else if (key === "testid") el.setAttribute("data-testid", value);
    else if (key.startsWith("on") && typeof value === "function") {
      el.addEventListener(key.slice(2).toLowerCase(), value);
    } else if (key === "style") throw new Error("set styles through element.style");
    else if (key in el && typeof el[key] !== "function" && !(el instanceof SVGElement)) {
      el[key] = value;
    } else el.setAttribute(key, value === true ? "" : String(value));
  }
  return el;
}

function append(el, children) {
  for (const child of children.flat(Infinity)) {
    if (child === null || child === undefined || child === false) continue;
    el.append(child instanceof Node ? child : document.createTextNode(String(child)));
  }
  return el;
}

/** An HTML element: h("button", {class: "x", onclick}, "Label"). */
export function h(tag, props, ...children) {
  return append(apply(document.createElement(tag), props), children);
}

/** An SVG element with attributes. */
export function s(tag, attrs, ...children) {
  const el = document.createElementNS(SVG_NS, tag);
  for (const [key, value] of Object.entries(attrs || {})) {
    if (value === undefined || value === null) continue;
    if (key === "text") el.textContent = value;
    else if (key === "testid") el.setAttribute("data-testid", value);
    else if (key.startsWith("on") && typeof value === "function") {
      el.addEventListener(key.slice(2).toLowerCase(), value);
    } else el.setAttribute(key, String(value));
  }
  return append(el, children);
}

/** Remove every child of `el`, then append `children`. */
export function replace(el, ...children) {
  el.replaceChildren();
  return append(el, children);
}

/** Call `fn` once `ms` after the last call. */
export function debounce(fn, ms) {
  let timer = null;
  return (...args) => {
    clearTimeout(timer);
    timer = setTimeout(() => fn(...args), ms);
  };
}

/** A download link for text generated in the page. */
export function blobLink(label, filename, type, text, testid) {
  const url = URL.createObjectURL(new Blob([text], { type }));
  return h("a", { class: "download", href: url, download: filename, testid }, label);
}

/** A titled figure block. */
export function card(title, ...children) {
  return h("section", { class: "card" }, h("h2", { class: "card-title" }, title), ...children);
}
