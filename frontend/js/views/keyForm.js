// The access-key form under the masthead, for servers that need a key (an open server on
// loopback needs none). The key stays in this tab's sessionStorage, never in the address; it
// opens by itself when the server answers that it needs one.

import { apiKey, KEY_NEEDED, setApiKey } from "../api.js";
import { h } from "../dom.js";
import { checkKey, KEY_LABEL } from "../lib/access.js";

const SET = "A key is set for this tab; every request of the page sends it.";
const UNSET = "No key set. A server without keys needs none.";

/** Attach the key form to the masthead's key button. */
export function installKeyForm(button, host) {
  const input = h("input", { id: "api-key", type: "password", autocomplete: "off", spellcheck: false,
    value: apiKey(), testid: "api-key", "aria-describedby": "api-key-status" });
  const error = h("p", { class: "field-error", role: "alert", hidden: true, testid: "key-error" });
  const status = h("span", { id: "api-key-status", class: "muted", role: "status", testid: "key-status" },
    apiKey() ? SET : UNSET);
  const form = h("form", { class: "key-form", hidden: true, testid: "key-form" },
    h("label", { for: "api-key" }, `${KEY_LABEL} of this server`), input,
    h("button", { type: "submit", class: "secondary small", testid: "key-save" }, "Use key"),
    h("button", { type: "button", class: "small", testid: "key-forget",
      onclick: () => { input.value = ""; save(); } }, "Forget"), status, error);
  const open = (show) => {
    form.hidden = !show;
    button.setAttribute("aria-expanded", String(show));
    if (show) input.focus();
  };
  const save = () => {
    const { key, error: problem } = checkKey(input.value);
    error.textContent = problem;
    error.hidden = !problem;
    if (problem) return;
    setApiKey(key);
    status.textContent = key ? SET : UNSET;
    window.dispatchEvent(new HashChangeEvent("hashchange")); // show the view again with the key
  };
  form.addEventListener("submit", (e) => { e.preventDefault(); save(); });
  button.addEventListener("click", () => open(form.hidden));
  window.addEventListener(KEY_NEEDED, (e) => {
    status.textContent = e.detail && e.detail.sent
      ? "This server did not accept the key set for this tab. Enter a valid one."
      : "This server needs an access key. Enter it here.";
    open(true);
  });
  host.append(form);
}
