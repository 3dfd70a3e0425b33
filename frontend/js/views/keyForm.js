// The API key form in the masthead, for servers that need a bearer key (an open server on
// loopback needs none).

import { apiKey, setApiKey } from "../api.js";
import { h } from "../dom.js";

/** Attach the key form to the masthead's key button. */
export function installKeyForm(button, host) {
  const input = h("input", { id: "api-key", type: "password", autocomplete: "off", value: apiKey(), testid: "api-key" });
  const status = h("span", { class: "muted", role: "status" }, apiKey() ? "A key is set for this tab." : "No key set.");
  const form = h("form", { class: "key-form", hidden: true },
    h("label", { for: "api-key" }, "API key of this server"), input,
    h("button", { type: "submit", class: "secondary small" }, "Use key"),
    h("button", { type: "button", class: "small", onclick: () => { input.value = ""; save(); } }, "Forget"), status);
  const save = () => {
    setApiKey(input.value.trim());
    status.textContent = apiKey() ? "Key set for this tab; reload the view to use it." : "No key set.";
  };
  form.addEventListener("submit", (e) => { e.preventDefault(); save(); window.dispatchEvent(new HashChangeEvent("hashchange")); });
  button.addEventListener("click", () => {
    form.hidden = !form.hidden;
    button.setAttribute("aria-expanded", String(!form.hidden));
    if (!form.hidden) input.focus();
  });
  host.append(form);
}
