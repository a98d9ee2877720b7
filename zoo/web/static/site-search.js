// Search of a static copy of the catalog (zoo site): filters /search-index.json in the browser.
// Small queries only: "field op value" and the yes/no fields, joined by "and" (docs/web.md).
"use strict";
const NUMBERS = ["area", "loop", "tokens", "states", "enabled", "automorphisms",
  "net_automorphisms", "iteration", "processes"];
const FLAGS = ["regular", "cyclic"];
const COMPARE = {
  "=": (a, b) => a === b, "!=": (a, b) => a !== b, "<": (a, b) => a < b,
  "<=": (a, b) => a <= b, ">": (a, b) => a > b, ">=": (a, b) => a >= b,
};
const MAX_SHOWN = 500;

class QueryError extends Error {
  constructor(message, position) { super(message); this.position = position; }
}

function parse(text) {
  const clauses = [];
  let position = 0;
  for (const part of text.split(/\band\b/i)) {
    const offset = position + (part.length - part.trimStart().length);
    position += part.length + 3;
    const clause = part.trim();
    if (!clause) {
      if (text.trim()) throw new QueryError("an empty clause around 'and'", offset);
      continue;
    }
    const flag = clause.match(/^(not\s+)?([a-z_]+)$/i);
    if (flag) {
      const name = flag[2].toLowerCase();
      if (!FLAGS.includes(name)) {
        throw new QueryError(`'${flag[2]}' is not a yes/no field; use ${FLAGS.join(" or ")}`,
          offset + (flag[1] || "").length);
      }
      clauses.push({ name, test: (v) => (Array.isArray(v) ? v.includes(!flag[1]) : v === !flag[1]) });
      continue;
    }
    const m = clause.match(/^([a-z_]+)\s*(!=|<=|>=|=|<|>)\s*(-?\d+)$/i);
    if (!m) throw new QueryError("expected 'field op number', e.g. loop >= 4", offset);
    const name = m[1].toLowerCase();
    if (!NUMBERS.includes(name)) {
      throw new QueryError(`unknown field '${m[1]}'; this copy searches ${NUMBERS.join(", ")}`, offset);
    }
    const value = Number(m[3]);
    const op = COMPARE[m[2]];
    clauses.push({ name, test: (v) => (Array.isArray(v) ? v.some((x) => op(x, value)) : op(v, value)) });
  }
  return clauses;
}

function cell(row, text, href) {
  const td = document.createElement("td");
  if (href) {
    const a = document.createElement("a");
    a.href = href;
    a.textContent = text;
    td.append(a);
  } else {
    td.textContent = text;
  }
  row.append(td);
}

async function run() {
  const params = new URLSearchParams(location.search);
  const query = params.get("q") || "";
  const box = document.getElementById("q");
  box.value = query;
  const problem = document.getElementById("query-error");
  let clauses;
  try {
    clauses = parse(query);
  } catch (error) {
    if (!(error instanceof QueryError)) throw error;
    document.getElementById("error-text").textContent = "Error: " + error.message;
    document.getElementById("caret").textContent = query + "\n" + " ".repeat(error.position) + "^";
    problem.hidden = false;
    return;
  }
  const index = await (await fetch("/search-index.json")).json();
  const found = index.classes.filter((c) => clauses.every((k) => k.test(c[k.name])));
  const shown = found.slice(0, MAX_SHOWN);
  document.getElementById("summary").textContent =
    `${found.length.toLocaleString("en")} classes match` +
    (shown.length < found.length ? `; showing ${shown.length}.` : ".");
  const bounded = clauses.some((k) => k.name === "area");
  document.getElementById("note").textContent =
    `This copy is complete up to area ${index.complete_to}.` +
    (bounded ? "" : " The query does not bound the area; larger areas are not in the answer.");
  const body = document.querySelector("#results tbody");
  for (const c of shown) {
    const row = document.createElement("tr");
    cell(row, c.id, `/classes/${c.id}/`);
    cell(row, c.label);
    cell(row, String(c.area));
    cell(row, String(c.loop));
    cell(row, String(c.tokens));
    cell(row, c.processes.join(", "));
    cell(row, String(c.states));
    cell(row, c.frame, `/frames/${c.frame}/`);
    cell(row, String(c.members));
    body.append(row);
  }
  document.getElementById("results").hidden = shown.length === 0;
}

run();
