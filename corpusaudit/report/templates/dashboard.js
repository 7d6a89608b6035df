"use strict";
// The dashboard's views, drawn from the embedded audit rows. Every string that came from a
// document reaches the page through textContent or setAttribute, never as markup.
(() => {
  const DATA = JSON.parse(document.getElementById("audit-data").textContent);
  const SEVERITIES = DATA.severities;
  const RANK = { error: 3, warning: 2, info: 1 };
  const MARK = { error: "\u2715", warning: "\u25b2", info: "\u25cf" };
  const CARDS_PER_PAGE = 48;
  const DOCUMENTS_PER_PAGE = 100;
  const FINDINGS_ON_CARD = 3;
  const SHEET_PX = 210;

  const fieldIndex = (fields) => Object.fromEntries(fields.map((name, i) => [name, i]));
  const D = fieldIndex(DATA.document_fields);
  const F = fieldIndex(DATA.figure_fields);
  const X = fieldIndex(DATA.finding_fields);
  const rules = DATA.rules;
  const ruleIndex = new Map(rules.map((rule, i) => [rule.id, i]));

  // ------------------------------------------------------------------ indexes
  const documents = DATA.documents.map((row, i) => ({
    i, id: row[D.document_id], path: row[D.path], status: row[D.status], error: row[D.error],
    pages: row[D.pages], groups: row[D.groups], pageInfo: row[D.page_info], annotated: !!row[D.annotated],
    figures: [], counts: { error: 0, warning: 0, info: 0 }, findings: 0, worstScore: 0,
  }));
  const documentById = new Map(documents.map((d) => [d.id, d]));
  const figureRows = DATA.figures.map((row, i) => ({
    i, id: row[F.figure_id], doc: documents[row[F.document]], page: row[F.page], index: row[F.index],
    box: [row[F.x0], row[F.y0], row[F.x1], row[F.y1]], source: row[F.source], type: row[F.chart_type],
    confidence: row[F.confidence], width: row[F.width_px], height: row[F.height_px], ppi: row[F.effective_ppi],
    caption: row[F.caption], thumb: row[F.thumbnail], unmeasured: row[F.unmeasured].map((r) => rules[r].id),
    low: !!row[F.low_confidence], number: row[F.figure_number], decidedBy: row[F.classified_by],
    findings: [], worst: 0, search: "",
  }));
  const figures = figureRows.filter((f) => f.doc);
  const figureById = new Map(figures.map((f) => [f.id, f]));
  for (const row of DATA.findings) {
    const figure = figureRows[row[X.figure]];
    if (!figure || !figure.doc) continue;
    const severity = SEVERITIES[row[X.severity]];
    const region = row[X.fx0] === null || row[X.fx1] === null ? null : [row[X.fx0], row[X.fy0], row[X.fx1], row[X.fy1]];
    figure.findings.push({ rule: rules[row[X.rule]], ruleIndex: row[X.rule], severity, message: row[X.message],
      value: row[X.value], threshold: row[X.threshold], region });
    figure.worst = Math.max(figure.worst, RANK[severity]);
    figure.doc.counts[severity] += 1;
    figure.doc.findings += 1;
  }
  for (const f of figures) {
    f.findings.sort((a, b) => RANK[b.severity] - RANK[a.severity]);
    f.search = [f.caption, f.doc.path, f.number, f.id, f.type].join(" ").toLowerCase();
    f.doc.figures.push(f);
  }
  for (const d of documents) {
    // Errors outrank any number of warnings, warnings any number of notes.
    d.worstScore = d.counts.error * 1e8 + d.counts.warning * 1e4 + d.counts.info;
    d.search = [d.path, ...d.groups].join(" ").toLowerCase();
  }

  // ------------------------------------------------------------------ helpers
  function el(tag, attrs, ...children) {
    const node = document.createElement(tag);
    for (const [key, value] of Object.entries(attrs || {})) {
      if (value === null || value === undefined || value === false) continue;
      if (key === "class") node.className = value;
      else node.setAttribute(key, value === true ? "" : String(value));
    }
    for (const child of children.flat(Infinity)) {
      if (child === null || child === undefined || child === false) continue;
      node.append(child instanceof Node ? child : document.createTextNode(String(child)));
    }
    return node;
  }
  // replaceChildren would print null and false as text; drop them first.
  const fill = (node, ...children) => node.replaceChildren(...children.flat(Infinity).filter((c) => c !== null && c !== false && c !== ""));
  const number = (n) => Number(n).toLocaleString("en");
  const plural = (n, word) => `${number(n)} ${word}${n === 1 ? "" : "s"}`;
  // Asset paths come from the audit; accept plain relative paths only.
  const safeAsset = (path) => (typeof path === "string" && /^[\w.\-/]+$/.test(path) && !path.startsWith("/")
    && !path.split("/").includes("..") ? path : "");
  const severityBadge = (severity, text) => el("span", { class: `sev sev-${severity}` },
    el("span", { "aria-hidden": "true" }, MARK[severity]), ` ${text || severity}`);
  const figureLabel = (f) => (f.number ? `Figure ${f.number}` : `Unnumbered figure ${f.index + 1}, page ${f.page}`);
  const typeText = (f) => (f.type ? f.type.replace("_", " ") : "unlabelled");
  const confidenceText = (f) => (f.confidence === null ? "" : f.confidence.toFixed(2));
  const altText = (f) => `${typeText(f)} chart, ${f.findings.length ? plural(f.findings.length, "finding")
    + ": " + [...new Set(f.findings.map((x) => `${x.rule.id} (${x.severity})`))].join(", ") : "no findings"}`;
  const fullImage = (f) => safeAsset(f.thumb).replace(/\.png$/, ".full.png");

  function parseRoute() {
    const raw = location.hash.replace(/^#/, "");
    const cut = raw.indexOf("?");
    const path = cut < 0 ? raw : raw.slice(0, cut);
    const params = new URLSearchParams(cut < 0 ? "" : raw.slice(cut + 1));
    const slash = path.indexOf("/");
    const view = (slash < 0 ? path : path.slice(0, slash)) || "overview";
    const arg = slash < 0 ? "" : decodeURIComponent(path.slice(slash + 1));
    return { view, arg, params };
  }
  const hashFor = (view, arg, params) => {
    const query = params ? params.toString() : "";
    return `#${view}${arg ? "/" + encodeURIComponent(arg) : ""}${query ? "?" + query : ""}`;
  };

  // ------------------------------------------------------------------ figure filters
  const FIGURE_KEYS = ["q", "rule", "sev", "type", "conf", "doc", "group", "sort"];
  const SORTS = {
    worst: ["Most severe first", (a, b) => b.worst - a.worst || b.findings.length - a.findings.length || a.i - b.i],
    findings: ["Most findings first", (a, b) => b.findings.length - a.findings.length || b.worst - a.worst || a.i - b.i],
    order: ["Document order", (a, b) => a.i - b.i],
    confidence: ["Lowest confidence first", (a, b) => (a.confidence ?? -1) - (b.confidence ?? -1) || a.i - b.i],
    type: ["Chart type", (a, b) => typeText(a).localeCompare(typeText(b)) || a.i - b.i],
  };
  const sortedCache = new Map();
  function sortedFigures(sort) {
    if (!sortedCache.has(sort)) sortedCache.set(sort, figures.slice().sort(SORTS[sort][1]));
    return sortedCache.get(sort);
  }
  function figureState(params) {
    const state = Object.fromEntries(FIGURE_KEYS.map((k) => [k, params.get(k) || ""]));
    if (!SORTS[state.sort]) state.sort = "worst";
    state.page = Math.max(1, parseInt(params.get("page"), 10) || 1);
    return state;
  }
  function figureParams(state, withPage) {
    const params = new URLSearchParams();
    for (const key of FIGURE_KEYS) if (state[key] && !(key === "sort" && state[key] === "worst")) params.set(key, state[key]);
    if (withPage && state.page > 1) params.set("page", state.page);
    return params;
  }
  let lastFilter = { key: null, result: [] };
  function filterFigures(state) {
    const key = figureParams(state, false).toString();
    if (lastFilter.key === key) return lastFilter.result;
    const wantedRule = state.rule ? (ruleIndex.has(state.rule) ? ruleIndex.get(state.rule) : -2) : -1;
    const terms = state.q.toLowerCase().split(/\s+/).filter(Boolean);
    const cut = state.group.indexOf("=");
    const groupColumn = cut < 0 ? -1 : DATA.groups.indexOf(state.group.slice(0, cut));
    const groupValue = cut < 0 ? "" : state.group.slice(cut + 1);
    const result = [];
    for (const f of sortedFigures(state.sort)) {
      if (state.doc && f.doc.id !== state.doc) continue;
      if (state.type && typeText(f) !== state.type.replace("_", " ")) continue;
      if (state.conf === "low" && !f.low) continue;
      if (state.conf === "sure" && (f.low || !f.type)) continue;
      if (state.group && (groupColumn < 0 || f.doc.groups[groupColumn] !== groupValue)) continue;
      if (state.sev === "none") {
        if (f.findings.length) continue;
      } else if (wantedRule !== -1 || state.sev) {
        const severity = state.sev === "any" ? "" : state.sev;
        if (!f.findings.some((x) => (wantedRule === -1 || x.ruleIndex === wantedRule) && (!severity || x.severity === severity))) continue;
      }
      if (terms.length && !terms.every((t) => f.search.includes(t))) continue;
      result.push(f);
    }
    lastFilter = { key, result };
    return result;
  }

  const form = document.getElementById("filters");
  function fillSelect(select, options) {
    select.replaceChildren(...options.map((o) => (o.group
      ? el("optgroup", { label: o.group }, o.options.map((p) => el("option", { value: p.value }, p.text)))
      : el("option", { value: o.value }, o.text))));
  }
  function buildFigureFilters() {
    const ruleFigures = new Map();
    const sevFigures = { error: 0, warning: 0, info: 0 };
    const types = new Map();
    for (const f of figures) {
      for (const id of new Set(f.findings.map((x) => x.rule.id))) ruleFigures.set(id, (ruleFigures.get(id) || 0) + 1);
      for (const s of new Set(f.findings.map((x) => x.severity))) sevFigures[s] += 1;
      types.set(typeText(f), (types.get(typeText(f)) || 0) + 1);
    }
    const flagged = figures.filter((f) => f.findings.length).length;
    fillSelect(form.elements.rule, [{ value: "", text: "Any rule" },
      ...rules.map((r) => ({ id: r.id, n: ruleFigures.get(r.id) || 0 }))
        .sort((a, b) => b.n - a.n || a.id.localeCompare(b.id))
        .map((r) => ({ value: r.id, text: `${r.id} (${number(r.n)})` }))]);
    fillSelect(form.elements.sev, [{ value: "", text: "Any" }, { value: "any", text: `With findings (${number(flagged)})` },
      ...SEVERITIES.map((s) => ({ value: s, text: `${MARK[s]} ${s} (${number(sevFigures[s])})` })),
      { value: "none", text: `Without findings (${number(figures.length - flagged)})` }]);
    fillSelect(form.elements.type, [{ value: "", text: "Any" },
      ...[...types].sort((a, b) => b[1] - a[1]).map(([t, n]) => ({ value: t, text: `${t} (${number(n)})` }))]);
    fillSelect(form.elements.conf, [{ value: "", text: "Any" }, { value: "low", text: "Low confidence only" },
      { value: "sure", text: "Confident labels only" }]);
    fillSelect(form.elements.doc, [{ value: "", text: "Any document" },
      ...documents.filter((d) => d.figures.length).sort((a, b) => a.path.localeCompare(b.path))
        .map((d) => ({ value: d.id, text: `${d.path} (${number(d.figures.length)})` }))]);
    if (DATA.groups.length) {
      fillSelect(form.elements.group, [{ value: "", text: "Any group" }, ...DATA.groups.map((column, c) => ({
        group: column,
        options: [...new Set(documents.map((d) => d.groups[c]))].sort().map((v) => ({ value: `${column}=${v}`, text: v || "(none)" })),
      }))]);
    } else {
      form.querySelector(".group-filter").hidden = true;
    }
    fillSelect(form.elements.sort, Object.entries(SORTS).map(([value, [text]]) => ({ value, text })));
  }
  function setFormValue(control, value) {
    if (control.tagName === "SELECT" && value && ![...control.options].some((o) => o.value === value)) {
      control.append(el("option", { value }, value)); // a shared link naming something this audit lacks
    }
    control.value = value;
  }
  function stateFromForm() {
    const state = Object.fromEntries(FIGURE_KEYS.map((k) => [k, form.elements[k].value]));
    state.page = 1;
    return state;
  }
  function applyFigureForm() {
    const state = stateFromForm();
    history.replaceState(null, "", hashFor("figures", "", figureParams(state, true)));
    renderFigures(state);
  }
  let searchTimer = 0;
  form.addEventListener("change", applyFigureForm);
  form.addEventListener("input", (event) => {
    if (event.target.name !== "q") return;
    clearTimeout(searchTimer);
    searchTimer = setTimeout(applyFigureForm, 120);
  });
  form.addEventListener("submit", (event) => { event.preventDefault(); applyFigureForm(); });
  document.getElementById("clear-filters").addEventListener("click", () => {
    for (const key of FIGURE_KEYS) form.elements[key].value = key === "sort" ? "worst" : "";
    applyFigureForm();
  });

  // ------------------------------------------------------------------ figures view
  function card(f, linkParams) {
    const thumb = safeAsset(f.thumb);
    const worst = SEVERITIES.find((s) => RANK[s] === f.worst);
    const shown = f.findings.slice(0, FINDINGS_ON_CARD);
    const typeLine = [typeText(f), f.confidence === null ? null : ` ${confidenceText(f)}`];
    return el("article", { class: `card${worst ? " worst-" + worst : ""}` },
      el("div", { class: "thumb" }, thumb
        ? el("img", { src: thumb, alt: altText(f), loading: "lazy", decoding: "async" })
        : el("span", { class: "none" }, "No image")),
      el("div", { class: "card-body" },
        el("p", { class: "card-title" }, el("a", { href: hashFor("figure", f.id, linkParams) }, figureLabel(f))),
        el("p", { class: "meta" }, `${f.doc.path} \u00b7 page ${f.page}`),
        el("p", { class: "meta" }, ...typeLine, f.low ? el("span", { class: "low" }, " \u25b2 low confidence") : null),
        f.caption ? el("p", { class: "caption" }, f.caption) : null,
        f.findings.length
          ? el("ul", { class: "finding-list", "aria-label": "Findings" },
            shown.map((x) => el("li", {}, severityBadge(x.severity), " ", el("code", {}, x.rule.id))),
            f.findings.length > shown.length ? el("li", { class: "more" }, `+ ${f.findings.length - shown.length} more`) : null)
          : el("p", { class: "meta" }, el("span", { class: "sev sev-none" }, "\u2713 no findings"))));
  }
  function pagerButtons(container, page, pages, go) {
    const button = (text, target, label) => {
      const b = el("button", { type: "button", "aria-label": label }, text);
      if (target < 1 || target > pages || target === page) b.disabled = true;
      else b.addEventListener("click", () => go(target));
      return b;
    };
    container.replaceChildren(...(pages <= 1 ? [] : [
      button("\u00ab First", 1, "First page"), button("\u2039 Previous", page - 1, "Previous page"),
      el("span", {}, `Page ${number(page)} of ${number(pages)}`),
      button("Next \u203a", page + 1, "Next page"), button("Last \u00bb", pages, "Last page")]));
  }
  function renderFigures(state) {
    for (const key of FIGURE_KEYS) setFormValue(form.elements[key], state[key]);
    const result = filterFigures(state);
    const pages = Math.max(1, Math.ceil(result.length / CARDS_PER_PAGE));
    const page = Math.min(state.page, pages);
    const start = (page - 1) * CARDS_PER_PAGE;
    const slice = result.slice(start, start + CARDS_PER_PAGE);
    const linkParams = figureParams(state, false);
    const cards = document.getElementById("cards");
    cards.replaceChildren(...(slice.length ? slice.map((f) => card(f, linkParams))
      : [el("p", { class: "empty" }, "No figure matches these filters.")]));
    document.getElementById("figure-count").textContent = result.length
      ? `Showing ${number(start + 1)}\u2013${number(start + slice.length)} of ${plural(result.length, "figure")}`
        + (result.length < figures.length ? ` (${number(figures.length)} in the audit)` : "")
      : `0 of ${plural(figures.length, "figure")}`;
    pagerButtons(document.getElementById("pager"), page, pages, (target) => {
      const next = { ...state, page: target };
      history.replaceState(null, "", hashFor("figures", "", figureParams(next, true)));
      renderFigures(next);
      document.getElementById("figures-h").scrollIntoView();
    });
  }

  // ------------------------------------------------------------------ figure detail
  const percent = (value, total) => `${Math.max(0, Math.min(100, (value / total) * 100)).toFixed(3)}%`;
  let detailNeighbours = { previous: null, next: null, back: "#figures" };
  function renderFigure(f, params) {
    const view = document.getElementById("view-figure");
    if (!f) {
      fill(view, el("h1", { id: "figure-h", tabindex: "-1" }, "Figure not found"),
        el("p", {}, el("a", { href: "#figures" }, "Back to figures")));
      return;
    }
    const state = figureState(params);
    const selection = filterFigures(state);
    let position = selection.indexOf(f);
    const list = position < 0 ? figures : selection;
    if (position < 0) position = figures.indexOf(f);
    const linkParams = figureParams(state, false);
    const previous = list[position - 1], next = list[position + 1];
    const backState = { ...state, page: Math.floor(Math.max(0, selection.indexOf(f)) / CARDS_PER_PAGE) + 1 };
    detailNeighbours = {
      previous: previous ? hashFor("figure", previous.id, linkParams) : null,
      next: next ? hashFor("figure", next.id, linkParams) : null,
      back: hashFor("figures", "", figureParams(backState, true)),
    };
    const regions = [];
    const items = f.findings.map((x, n) => {
      const marker = x.region && f.width && f.height ? String(regions.length + 1) : null;
      if (marker) regions.push({ marker, finding: x });
      return el("li", {},
        el("h3", {}, marker ? el("span", { class: "marker", "aria-label": `region ${marker}` }, marker) : null,
          severityBadge(x.severity), el("code", {}, x.rule.id)),
        el("p", {}, x.message),
        x.value || x.threshold ? el("p", { class: "measure" },
          el("strong", {}, "Measured: "), x.value || "\u2014", " \u00b7 ", el("strong", {}, "Threshold: "), x.threshold || "\u2014") : null,
        x.rule.rationale ? el("p", {}, el("strong", {}, "Why it matters. "), x.rule.rationale) : null,
        x.rule.fix ? el("p", {}, el("strong", {}, "Suggested fix. "), x.rule.fix) : null,
        el("p", {}, el("a", { href: hashFor("rules", "", new URLSearchParams({ rule: x.rule.id })) }, `About ${x.rule.id}`)));
    });
    const full = fullImage(f);
    const image = full ? el("img", { src: full, alt: altText(f), width: f.width || null, height: f.height || null }) : null;
    if (image) image.addEventListener("error", () => { image.src = safeAsset(f.thumb); }, { once: true });
    const frame = el("div", { class: "figure-frame" }, image || el("p", { class: "empty" }, "No image of this figure."),
      regions.map(({ marker, finding }) => {
        const [x0, y0, x1, y1] = finding.region;
        const box = el("div", { class: `region sev-border-${finding.severity}`, title: `${marker}: ${finding.rule.id}` },
          el("span", { class: "region-label", "aria-hidden": "true" }, marker));
        box.style.left = percent(Math.min(x0, x1), f.width);
        box.style.top = percent(Math.min(y0, y1), f.height);
        box.style.width = percent(Math.abs(x1 - x0), f.width);
        box.style.height = percent(Math.abs(y1 - y0), f.height);
        return box;
      }));
    const facts = [
      ["Document", el("a", { href: hashFor("document", f.doc.id) }, f.doc.path)],
      ["Page", String(f.page)],
      ["Chart type", [typeText(f), f.confidence === null ? "" : ` (confidence ${confidenceText(f)})`,
        f.decidedBy === "vector" ? " — decided by the PDF's drawn wedges" : "",
        f.low ? el("span", { class: "low" }, " \u25b2 low confidence: rules for specific chart types were not applied") : null]],
      ["Source", f.source],
      ["Size", f.width ? `${number(f.width)} \u00d7 ${number(f.height)} px` : "\u2014"],
      ["Resolution", f.ppi ? `${number(Math.round(f.ppi))} ppi at print size` : "\u2014"],
      ["Place on page", f.box[0] === null ? "\u2014" : `x ${f.box[0]}\u2013${f.box[2]}, y ${f.box[1]}\u2013${f.box[3]} (points)`],
      ["Figure id", el("code", {}, f.id)],
    ];
    fill(view, 
      el("nav", { class: "crumbs", "aria-label": "Figure navigation" },
        el("a", { href: detailNeighbours.back }, "\u2190 Back to figures"),
        position >= 0 ? el("span", { class: "muted" }, `${number(position + 1)} of ${number(list.length)}`) : null,
        previous ? el("a", { href: detailNeighbours.previous, rel: "prev" }, "\u2039 Previous") : null,
        next ? el("a", { href: detailNeighbours.next, rel: "next" }, "Next \u203a") : null,
        el("span", { class: "muted" }, "Keys: \u2190 \u2192 move, Esc back")),
      el("h1", { id: "figure-h", tabindex: "-1" }, `${figureLabel(f)}, ${f.doc.path}`),
      f.caption ? el("p", { class: "caption-full" }, el("em", {}, f.caption)) : null,
      el("div", { class: "detail" },
        el("div", {}, frame, regions.length
          ? el("p", { class: "muted" }, "Outlined: the regions the numbered findings point at.") : null),
        el("div", {},
          el("section", { class: "panel", "aria-labelledby": "found-h" },
            el("h2", { id: "found-h" }, f.findings.length ? `What was found (${f.findings.length})` : "What was found"),
            f.findings.length ? el("ol", { class: "findings-detail" }, items)
              : el("p", {}, el("span", { class: "sev sev-none" }, "\u2713 no findings"), " None of the applicable checks found anything.")),
          f.unmeasured.length ? el("section", { class: "panel", "aria-labelledby": "unmeasured-h" },
            el("h2", { id: "unmeasured-h" }, `Not measured (${f.unmeasured.length})`),
            el("p", { class: "muted" }, "These checks apply to this figure but could not measure it: look at it by eye."),
            el("ul", {}, f.unmeasured.map((id) => el("li", {},
              el("a", { href: hashFor("rules", "", new URLSearchParams({ rule: id })) }, el("code", {}, id)))))) : null,
          el("section", { class: "panel", "aria-labelledby": "about-h" },
            el("h2", { id: "about-h" }, "About this figure"),
            el("dl", { class: "facts" }, facts.map(([term, value]) => [el("dt", {}, term), el("dd", {}, value)]))))));
  }

  // ------------------------------------------------------------------ documents list
  const documentForm = document.getElementById("document-filters");
  const DOCUMENT_SORTS = {
    worst: ["Most severe first", (a, b) => b.worstScore - a.worstScore || a.path.localeCompare(b.path)],
    rate: ["Findings per figure", (a, b) => rate(b) - rate(a) || b.findings - a.findings || a.path.localeCompare(b.path)],
    path: ["File name", (a, b) => a.path.localeCompare(b.path)],
  };
  const rate = (d) => (d.figures.length ? d.findings / d.figures.length : 0);
  fillSelect(documentForm.elements.status, [{ value: "", text: "Any" }, { value: "findings", text: "With findings" },
    ...[...new Set(documents.map((d) => d.status))].sort().map((s) => ({ value: s, text: s }))]);
  fillSelect(documentForm.elements.sort, Object.entries(DOCUMENT_SORTS).map(([value, [text]]) => ({ value, text })));
  function documentState(params) {
    const state = { q: params.get("q") || "", status: params.get("status") || "", sort: params.get("sort") || "worst",
      page: Math.max(1, parseInt(params.get("page"), 10) || 1) };
    if (!DOCUMENT_SORTS[state.sort]) state.sort = "worst";
    return state;
  }
  function documentParams(state) {
    const params = new URLSearchParams();
    if (state.q) params.set("q", state.q);
    if (state.status) params.set("status", state.status);
    if (state.sort !== "worst") params.set("sort", state.sort);
    if (state.page > 1) params.set("page", state.page);
    return params;
  }
  function applyDocumentForm() {
    const state = { q: documentForm.elements.q.value, status: documentForm.elements.status.value,
      sort: documentForm.elements.sort.value, page: 1 };
    history.replaceState(null, "", hashFor("documents", "", documentParams(state)));
    renderDocuments(state);
  }
  documentForm.addEventListener("change", applyDocumentForm);
  documentForm.addEventListener("input", (event) => {
    if (event.target.name !== "q") return;
    clearTimeout(searchTimer);
    searchTimer = setTimeout(applyDocumentForm, 120);
  });
  documentForm.addEventListener("submit", (event) => { event.preventDefault(); applyDocumentForm(); });
  function renderDocuments(state) {
    setFormValue(documentForm.elements.q, state.q);
    setFormValue(documentForm.elements.status, state.status);
    setFormValue(documentForm.elements.sort, state.sort);
    const terms = state.q.toLowerCase().split(/\s+/).filter(Boolean);
    const result = documents.filter((d) => (!state.status || (state.status === "findings" ? d.findings > 0 : d.status === state.status))
      && terms.every((t) => d.search.includes(t))).sort(DOCUMENT_SORTS[state.sort][1]);
    const pages = Math.max(1, Math.ceil(result.length / DOCUMENTS_PER_PAGE));
    const page = Math.min(state.page, pages);
    const slice = result.slice((page - 1) * DOCUMENTS_PER_PAGE, page * DOCUMENTS_PER_PAGE);
    const head = el("thead", {}, el("tr", {}, el("th", { scope: "col" }, "Document"), el("th", { scope: "col" }, "Status"),
      ["Pages", "Figures", "Findings"].map((t) => el("th", { scope: "col", class: "num" }, t)),
      SEVERITIES.map((s) => el("th", { scope: "col", class: "num" }, severityBadge(s))),
      el("th", { scope: "col", class: "num" }, "Per figure"), DATA.groups.map((g) => el("th", { scope: "col" }, g))));
    const body = el("tbody", {}, slice.map((d) => el("tr", {},
      el("th", { scope: "row" }, el("a", { href: hashFor("document", d.id) }, d.path)),
      el("td", {}, d.status === "ok" ? "ok" : el("span", { class: "sev sev-error" }, el("span", { "aria-hidden": "true" }, MARK.error), ` ${d.status}`)),
      [d.pages, d.figures.length, d.findings].map((n) => el("td", { class: "num" }, number(n))),
      SEVERITIES.map((s) => el("td", { class: "num" }, number(d.counts[s]))),
      el("td", { class: "num" }, d.figures.length ? rate(d).toFixed(2) : "\u2014"),
      d.groups.map((g) => el("td", {}, g)))));
    document.getElementById("document-table").replaceChildren(head, body);
    document.getElementById("document-count").textContent = `${plural(result.length, "document")}`
      + (result.length < documents.length ? ` of ${number(documents.length)}` : "");
    pagerButtons(document.getElementById("document-pager"), page, pages, (target) => {
      const next = { ...state, page: target };
      history.replaceState(null, "", hashFor("documents", "", documentParams(next)));
      renderDocuments(next);
    });
  }

  // ------------------------------------------------------------------ document view
  function pageSize(d, page, onPage) {
    const info = d.pageInfo[String(page)];
    if (info) return { width: info[0], height: info[1], image: safeAsset(info[2]) };
    if (onPage.length === 1 && onPage[0].source === "image") {
      return { width: onPage[0].box[2] || onPage[0].width, height: onPage[0].box[3] || onPage[0].height, image: "" };
    }
    // No recorded size: an A4 outline, grown to hold every box on the page.
    return { width: Math.max(DATA.default_page[0], ...onPage.map((f) => (f.box[2] || 0) + 18)),
      height: Math.max(DATA.default_page[1], ...onPage.map((f) => (f.box[3] || 0) + 18)), image: "" };
  }
  function renderDocument(d) {
    const view = document.getElementById("view-document");
    if (!d) {
      fill(view, el("h1", { id: "document-h", tabindex: "-1" }, "Document not found"),
        el("p", {}, el("a", { href: "#documents" }, "Back to documents")));
      return;
    }
    const byPage = new Map();
    for (const f of d.figures) {
      if (!byPage.has(f.page)) byPage.set(f.page, []);
      byPage.get(f.page).push(f);
    }
    const letter = `letters/${encodeURIComponent(d.id)}`;
    const links = DATA.letters ? [el("a", { href: `${letter}.html` }, "Letter to the authors"), " (",
      el("a", { href: `${letter}.md` }, "Markdown"), ")"] : [];
    const separator = () => (links.length ? " \u00b7 " : "");
    if (d.annotated) links.push(separator(), el("a", { href: `annotated/${encodeURIComponent(d.id)}.pdf` }, "Annotated PDF"));
    if (d.figures.length) links.push(separator(), el("a", { href: hashFor("figures", "", new URLSearchParams({ doc: d.id })) }, "Its figures in the grid"));
    const pages = [...byPage.keys()].sort((a, b) => a - b).map((page) => {
      const onPage = byPage.get(page).sort((a, b) => a.index - b.index);
      const size = pageSize(d, page, onPage);
      const sheet = el("div", { class: "page-sheet", role: "group", "aria-label": `Page ${page}` },
        size.image ? el("img", { class: "page-image", src: size.image, alt: "" }) : null,
        onPage.map((f, n) => {
          const worst = SEVERITIES.find((s) => RANK[s] === f.worst);
          const thumb = size.image ? "" : safeAsset(f.thumb);
          const box = el("a", { class: `fig-box${worst ? " worst-" + worst : ""}`, href: hashFor("figure", f.id),
            "aria-label": `${figureLabel(f)}: ${altText(f)}` },
          thumb ? el("img", { src: thumb, alt: "", loading: "lazy" }) : null,
          el("span", { "aria-hidden": "true" }, `${n + 1}${worst ? " " + MARK[worst] : ""}`));
          const [x0, y0, x1, y1] = f.box;
          if (x0 !== null) {
            box.style.left = percent(x0, size.width);
            box.style.top = percent(y0, size.height);
            box.style.width = percent(x1 - x0, size.width);
            box.style.height = percent(y1 - y0, size.height);
          }
          return box;
        }));
      sheet.style.width = `${SHEET_PX}px`;
      sheet.style.height = `${Math.round((SHEET_PX * size.height) / size.width)}px`;
      const findings = onPage.filter((f) => f.findings.length).map((f) => el("li", {},
        el("a", { href: hashFor("figure", f.id) }, `${onPage.indexOf(f) + 1} \u00b7 ${figureLabel(f)}`),
        el("span", { class: "muted" }, ` (${typeText(f)})`),
        el("ul", { class: "finding-list nested" }, f.findings.map((x) => el("li", {},
          severityBadge(x.severity), " ", el("code", {}, x.rule.id), ": ", x.message)))));
      return el("div", { class: "page-row panel" },
        el("div", {}, sheet, el("p", { class: "page-label" }, `Page ${page}`)),
        el("div", {}, el("h2", {}, `Page ${page}: ${plural(onPage.length, "figure")}`),
          findings.length ? el("ul", { class: "page-findings" }, findings)
            : el("p", { class: "muted" }, "No findings on this page.")));
    });
    const groups = DATA.groups.map((g, c) => `${g}: ${d.groups[c] || "(none)"}`).join(" \u00b7 ");
    fill(view, 
      el("nav", { class: "crumbs", "aria-label": "Document navigation" }, el("a", { href: "#documents" }, "\u2190 Documents")),
      el("h1", { id: "document-h", tabindex: "-1" }, d.path),
      el("p", {}, d.status === "ok" ? "" : severityBadge("error", d.status), d.status === "ok" ? "" : " ",
        `${plural(d.pages, "page")}, ${plural(d.figures.length, "figure")}, ${plural(d.findings, "finding")}`,
        d.findings ? ` (${SEVERITIES.filter((s) => d.counts[s]).map((s) => `${number(d.counts[s])} ${s}`).join(", ")})` : "",
        groups ? ` \u00b7 ${groups}` : ""),
      el("p", {}, links),
      d.status !== "ok" ? el("p", { class: "panel attention" }, `This file could not be audited: ${d.error || d.status}`) : null,
      pages.length ? el("div", { class: "pages" }, pages) : el("p", { class: "empty" }, "No figures were found in this document."),
      pages.length && d.pages > pages.length
        ? el("p", { class: "muted" }, `${plural(d.pages - pages.length, "other page")} without figures not shown.`) : null);
  }

  // ------------------------------------------------------------------ routing
  const views = ["overview", "figures", "figure", "documents", "document", "rules"];
  const TAB_OF = { figure: "figures", document: "documents" };
  let currentView = null;
  function show(view) {
    for (const name of views) document.getElementById(`view-${name}`).hidden = name !== view;
    for (const tab of document.querySelectorAll(".tabs a")) {
      if (tab.dataset.view === (TAB_OF[view] || view)) tab.setAttribute("aria-current", "page");
      else tab.removeAttribute("aria-current");
    }
  }
  function route() {
    const { view: asked, arg, params } = parseRoute();
    const view = views.includes(asked) ? asked : "overview";
    const changed = view !== currentView || view === "figure" || view === "document";
    show(view);
    if (view === "figures") renderFigures(figureState(params));
    else if (view === "figure") renderFigure(figureById.get(arg), params);
    else if (view === "documents") renderDocuments(documentState(params));
    else if (view === "document") renderDocument(documentById.get(arg));
    const titles = { overview: "Overview", figures: "Figures", figure: "Figure", documents: "Documents", document: "Document", rules: "Rules" };
    document.title = `${titles[view]} \u00b7 Figure audit`;
    if (view === "rules" && params.get("rule")) {
      const target = document.getElementById(`rule-${params.get("rule")}`);
      if (target) { target.scrollIntoView(); target.setAttribute("tabindex", "-1"); target.focus(); }
    } else if (changed && currentView !== null) {
      window.scrollTo(0, 0);
      const heading = document.querySelector(`#view-${view} h1`);
      heading.setAttribute("tabindex", "-1");
      heading.focus({ preventScroll: true });
    }
    currentView = view;
  }
  document.addEventListener("keydown", (event) => {
    if (currentView !== "figure" || event.altKey || event.ctrlKey || event.metaKey) return;
    if (event.target.closest("input, select, textarea")) return;
    const target = { ArrowLeft: detailNeighbours.previous, ArrowRight: detailNeighbours.next, Escape: detailNeighbours.back }[event.key];
    if (target) { event.preventDefault(); location.hash = target; }
  });
  buildFigureFilters();
  window.addEventListener("hashchange", route);
  route();
  document.documentElement.dataset.ready = "true";
  performance.mark("dashboard-ready");
})();
