// Coldseam page: a hash router over the three flows.
//   #/template[/<id>]      junction template
//   #/upload               section JSON or DXF drawing
//   #/open                 open a stored evaluation
//   #/evaluations/<id>     an evaluation's progress and results (shareable)
//   #/schedule             a junction schedule (CSV) or a grid of values, as one batch
//   #/batches/<id>         a batch's progress, table, plot and downloads (shareable)

import { h, replace } from "./dom.js";
import { batchView } from "./views/batchView.js";
import { installKeyForm } from "./views/keyForm.js";
import { openView } from "./views/openView.js";
import { resultView } from "./views/resultView.js";
import { scheduleView } from "./views/scheduleView.js";
import { templateView } from "./views/templateView.js";
import { uploadView } from "./views/uploadView.js";

const main = document.getElementById("main");
let stop = () => {};

function route() {
  const parts = location.hash.replace(/^#\/?/, "").split("/").map(decodeURIComponent);
  const [name, arg] = parts;
  if (name === "evaluations" && arg) return ["results", (root) => resultView(root, arg)];
  if (name === "batches" && arg) return ["schedule", (root) => batchView(root, arg)];
  if (name === "schedule") return ["schedule", scheduleView];
  if (name === "upload") return ["upload", uploadView];
  if (name === "open") return ["open", openView];
  return ["template", (root) => templateView(root, arg)];
}

async function render() {
  stop();
  const [name, view] = route();
  for (const link of document.querySelectorAll("[data-nav]")) {
    if (link.dataset.nav === name) link.setAttribute("aria-current", "page");
    else link.removeAttribute("aria-current");
  }
  document.body.dataset.view = name;
  try {
    stop = (await view(main)) || (() => {});
  } catch (err) {
    stop = () => {};
    replace(main, h("section", { class: "card" }, h("h2", { class: "card-title" }, "Something went wrong in the page"),
      h("p", { testid: "page-error" }, String(err && err.message ? err.message : err))));
    throw err;
  }
}

installKeyForm(document.getElementById("key-button"), document.getElementById("key-host"));
window.addEventListener("hashchange", render);
render();
