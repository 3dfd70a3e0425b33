// The schedule view at #/schedule: a junction schedule pasted or uploaded as CSV, or a grid of
// template parameter values, sent as one batch; the batch is then followed at #/batches/<id>.

import { ApiError, call, listTemplates, startBatch } from "../api.js";
import { h, replace } from "../dom.js";
import { fixed } from "../lib/format.js";
import { countsLine, gridDocument, gridSize, parseValues } from "../lib/schedule.js";
import { humanise } from "./inputs.js";
import { problemList, showProblems } from "./problems.js";
import { scroller } from "./tables.js";

const EXAMPLE = `id,template,length,insulation_thickness,connection
J2 first-floor slab edge,floor_slab,64,160,
J3 external corners,wall_corner,28.8,160,
J4 roof terrace balcony,balcony,12,,thermal_break`;

/** Render the schedule form into `root`. */
export async function scheduleView(root) {
  const controller = new AbortController();
  const problems = problemList();
  const name = h("input", { id: "batch-name", type: "text", testid: "batch-name", placeholder: "e.g. Harrowgate Lane schedule" });
  let templates = [];
  try {
    templates = await listTemplates();
  } catch (err) {
    if (!(err instanceof ApiError)) throw err;
    showProblems(problems, err.problems);
  }
  const send = async (body) => {
    showProblems(problems, []);
    try {
      const accepted = await startBatch({ ...body, name: name.value.trim() || undefined });
      location.hash = `#/batches/${encodeURIComponent(accepted.id)}`;
    } catch (err) {
      if (!(err instanceof ApiError)) throw err;
      showProblems(problems, err.problems);
    }
  };
  replace(root, h("div", { class: "schedule-forms" },
    h("section", { class: "card" }, h("h2", { class: "card-title" }, "Junction schedule"),
      h("p", { class: "hint" }, "Every junction of a building, or every option of a detail, evaluated as one batch: ψ, ψ·l, fRsi, verdicts and Σ ψ·l."),
      h("div", { class: "field" }, h("label", { for: "batch-name" }, "Name of the batch (optional)"), name),
      problems),
    csvCard(send), gridCard(templates, send), earlierCard(controller.signal)));
  return () => controller.abort();
}

/** The key's earlier batches, newest first, each a link to its page at #/batches/<id>. */
function earlierCard(signal) {
  const body = h("div", {}, h("p", { class: "placeholder" }, "Loading the list…"));
  const section = h("section", { class: "card", testid: "batch-list" },
    h("h2", { class: "card-title" }, "Earlier batches"), body);
  call("batches?limit=50", { signal }).then(({ data }) => {
    const items = data?.items || [];
    replace(section, h("h2", { class: "card-title" }, `Earlier batches (${data?.total ?? items.length})`),
      items.length ? scroller(batchTable(items))
        : h("p", { class: "muted" }, "No batches yet with this access key."));
  }).catch((err) => {
    if (err.name === "AbortError") return;
    if (!(err instanceof ApiError)) throw err;
    replace(body, h("p", { class: "muted" }, `The list is not available: ${err.message}`));
  });
  return section;
}

function batchTable(items) {
  const head = ["Name", "Date (UTC)", "Junctions", "Σ ψ·l W/K", "Status"];
  return h("table", { class: "figures batch-list" },
    h("thead", {}, h("tr", {}, head.map((c, i) => h("th", { scope: "col", class: i > 1 ? "num" : "" }, c)))),
    h("tbody", {}, items.map((batch) => h("tr", { testid: "batch-row" },
      h("th", { scope: "row" }, h("a", { href: `#/batches/${encodeURIComponent(batch.id)}`, testid: "batch-link" },
        batch.name || `Batch ${batch.id.slice(0, 8)}`)),
      h("td", {}, String(batch.created_at || "").replace("T", " ").replace(/(\.\d+)?Z$/, "")),
      h("td", { class: "num", title: countsLine(batch) }, String(batch.total)),
      h("td", { class: "num", testid: "batch-row-sum" }, fixed(batch.sum_psi_l, 2)),
      h("td", { class: "num" }, batch.status)))));
}

function csvCard(send) {
  const text = h("textarea", { id: "schedule-csv", rows: 8, spellcheck: false, class: "schedule-text",
    testid: "schedule-csv", placeholder: EXAMPLE });
  const file = h("input", { type: "file", accept: ".csv,text/csv", class: "file-input", testid: "schedule-file",
    "aria-label": "Upload a CSV schedule" });
  file.addEventListener("change", async () => {
    if (file.files[0]) text.value = await file.files[0].text();
  });
  const example = h("button", { type: "button", class: "secondary small", testid: "schedule-example",
    onclick: () => { text.value = EXAMPLE; } }, "Fill in an example");
  const form = h("form", { class: "card" }, h("h2", { class: "card-title" }, "From a CSV schedule"),
    h("p", { class: "hint" }, "Columns id, template, length (m), then one column per template parameter; a blank cell keeps the template's default."),
    h("div", { class: "field" }, h("label", { for: "schedule-csv" }, "Paste the schedule"), text),
    h("div", { class: "field" }, h("span", { class: "drop-label" }, "or upload a .csv file"), file),
    h("div", { class: "actions" }, example,
      h("button", { type: "submit", class: "primary", testid: "schedule-run" }, "Evaluate the schedule")));
  form.addEventListener("submit", (e) => {
    e.preventDefault();
    send({ csv: text.value });
  });
  return form;
}

function gridCard(templates, send) {
  const picker = h("select", { id: "grid-template", testid: "grid-template" },
    templates.map((t) => h("option", { value: t.id }, t.title || t.id)));
  const length = h("input", { id: "grid-length", type: "number", step: "any", min: 0, testid: "grid-length" });
  const cells = h("div", { class: "grid-cells" });
  const size = h("p", { class: "hint", testid: "grid-size", "aria-live": "polite" });
  let inputs = [];
  const count = () => { size.textContent = `${gridSize(values())} evaluations`; };
  const values = () => Object.fromEntries(inputs.map((i) => [i.name, parseValues(i.value)]));
  const choose = () => {
    const template = templates.find((t) => t.id === picker.value);
    inputs = (template ? template.parameters : []).filter((p) => p.kind === "number" || p.kind === "choice")
      .map((p) => h("input", { name: p.name, type: "text", autocomplete: "off", testid: `grid-${p.name}`,
        placeholder: `default ${p.default}`, id: `grid-${p.name}`, oninput: count }));
    const params = template ? template.parameters : [];
    replace(cells, inputs.map((input) => {
      const p = params.find((q) => q.name === input.name);
      return h("div", { class: "field" }, h("label", { for: input.id }, `${p.description || humanise(p.name)}${p.unit ? ` (${p.unit})` : ""}`), input);
    }));
    count();
  };
  picker.addEventListener("input", choose);
  const form = h("form", { class: "card" }, h("h2", { class: "card-title" }, "From a grid of values"),
    h("p", { class: "hint" }, "Values separated by commas, e.g. 100, 160, 200: every combination is evaluated. A blank field keeps the default."),
    h("div", { class: "field" }, h("label", { for: "grid-template" }, "Junction type"), picker),
    h("div", { class: "field" }, h("label", { for: "grid-length" }, "Length of each junction (m, optional)"), length),
    cells, size,
    h("div", { class: "actions" }, h("button", { type: "submit", class: "primary", testid: "grid-run" }, "Evaluate the grid")));
  form.addEventListener("submit", (e) => {
    e.preventDefault();
    const metres = length.value === "" ? NaN : Number(length.value);
    send({ json: gridDocument(picker.value, values(), { length: metres }) });
  });
  if (templates.length) choose();
  return form;
}
