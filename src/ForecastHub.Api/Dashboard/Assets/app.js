// ForecastHub dashboard: reads the v1 API and draws everything as inline SVG and HTML.
"use strict";

const KEY_STORAGE = "forecasthub.apiKey";
const HISTORY_HOURS = 72;
// Each card costs two calls; more sites than this are counted but not drawn (rate limits, page size).
const MAX_CARDS = 24;
const LEVELS = [80, 95];
// The page reloads the selected site's forecast and risk this often.
const REFRESH_MS = 5 * 60 * 1000;
const state = { sites: [], selected: null, editing: false };

class ApiError extends Error {
  constructor(status, problem) {
    super((problem && (problem.detail || problem.title)) || `HTTP ${status}`);
    this.status = status;
    this.problem = problem;
  }
}

async function getJson(path, init) {
  const headers = { Accept: "application/json" };
  const key = sessionStorage.getItem(KEY_STORAGE);
  if (key) headers.Authorization = `Bearer ${key}`;
  if (init && init.body) headers["Content-Type"] = "application/json";
  const response = await fetch(path, Object.assign({ headers }, init || {}));
  if (!response.ok) {
    let problem = null;
    try { problem = await response.json(); } catch { problem = null; }
    throw new ApiError(response.status, problem);
  }
  return response.json();
}

// Lists come either as a bare array or wrapped in an object with one array member.
function listOf(body) {
  if (Array.isArray(body)) return body;
  for (const value of Object.values(body || {})) if (Array.isArray(value)) return value;
  return [];
}

function h(tag, attrs, ...children) {
  const node = document.createElement(tag);
  for (const [key, value] of Object.entries(attrs || {})) {
    if (value === undefined || value === null || value === false) continue;
    if (key === "class") node.className = value;
    else if (key.startsWith("on")) node.addEventListener(key.slice(2), value);
    else node.setAttribute(key, value === true ? "" : String(value));
  }
  for (const child of children.flat()) {
    if (child === null || child === undefined || child === false) continue;
    node.appendChild(typeof child === "string" || typeof child === "number" ? document.createTextNode(String(child)) : child);
  }
  return node;
}

const num = (v, digits = 1) => (typeof v === "number" && isFinite(v) ? v.toFixed(digits).replace("-", "−") : "–");
const degrees = (v, digits = 1) => (typeof v === "number" && isFinite(v) ? `${num(v, digits)} °C` : "–");
const percent = v => (typeof v === "number" && isFinite(v) ? `${(100 * v).toFixed(v < 0.01 && v > 0 ? 1 : 0)} %` : "–");

function localTime(iso, timeZone, withDate = true) {
  if (!iso) return "–";
  const options = withDate
    ? { timeZone, weekday: "short", day: "numeric", month: "short", hour: "2-digit", minute: "2-digit", hourCycle: "h23" }
    : { timeZone, hour: "2-digit", minute: "2-digit", hourCycle: "h23" };
  return new Intl.DateTimeFormat("en-GB", options).format(new Date(iso));
}

function ago(iso) {
  if (!iso) return "never";
  const minutes = Math.round((Date.now() - Date.parse(iso)) / 60000);
  if (minutes < 90) return `${minutes} min ago`;
  const hours = Math.round(minutes / 60);
  return hours < 48 ? `${hours} h ago` : `${Math.round(hours / 24)} days ago`;
}

const STATE_LABELS = {
  "ok": "ok",
  "warming-up": "warming up",
  "stale": "stale",
  "drifting": "drifting",
  "sensor-suspect": "sensor suspect",
};

function stateBadge(stateName) {
  const known = Object.prototype.hasOwnProperty.call(STATE_LABELS, stateName);
  return h("span", { class: `state state-${known ? stateName : "unknown"}`, "data-state": stateName || "unknown" },
    known ? STATE_LABELS[stateName] : (stateName || "unknown"));
}

function panel(title, why, ...content) {
  return h("section", { class: "panel" }, h("h3", {}, title), why ? h("p", { class: "why" }, why) : null, ...content);
}

function unavailable(title, message) {
  return h("section", { class: "panel unavailable" }, h("h3", {}, title), h("p", { class: "note" }, message));
}

function table(head, rows, attrs) {
  return h("table", Object.assign({ class: "numbers" }, attrs || {}),
    h("thead", {}, h("tr", {}, head.map(c => h("th", { scope: "col" }, c)))),
    h("tbody", {}, rows.map(r => h("tr", {}, r.map((c, i) => (i === 0 ? h("th", { scope: "row" }, c) : h("td", {}, c)))))));
}

// ---- the fleet ----------------------------------------------------------------------------

async function loadFleet() {
  const summary = document.getElementById("fleet-summary");
  const list = document.getElementById("site-list");
  try {
    state.sites = listOf(await getJson("/api/v1/sites"));
  } catch (error) {
    summary.textContent = error.status === 401 || error.status === 403
      ? "Reads need an API key here: enter one above."
      : `Could not load sites: ${error.message}`;
    return;
  }
  list.replaceChildren();
  if (!state.sites.length) {
    summary.textContent = "No sites yet. Create one with POST /api/v1/sites.";
    return;
  }
  const details = await Promise.all(state.sites.slice(0, MAX_CARDS).map(siteOverview));
  const counts = {};
  details.forEach(d => { counts[d.state] = (counts[d.state] || 0) + 1; });
  summary.textContent = `${state.sites.length} site${state.sites.length === 1 ? "" : "s"}: ` +
    Object.entries(counts).map(([s, n]) => `${n} ${STATE_LABELS[s] || s}`).join(", ") +
    (state.sites.length > MAX_CARDS ? ` (the first ${MAX_CARDS} shown)` : "");
  for (const d of details) list.appendChild(siteCard(d));
  const wanted = new URLSearchParams(location.hash.slice(1)).get("site");
  const first = details.find(d => d.site.id === wanted) || details[0];
  await selectSite(first.site.id);
}

async function siteOverview(site) {
  const health = await getJson(`/api/v1/sites/${encodeURIComponent(site.id)}/health`).catch(() => null);
  let latest = null;
  if (health && health.lastObservationAt) {
    const to = new Date(Date.parse(health.lastObservationAt) + 1000).toISOString();
    const from = new Date(Date.parse(health.lastObservationAt) - 3600e3).toISOString();
    const readings = listOf(await getJson(`/api/v1/sites/${encodeURIComponent(site.id)}/observations?from=${from}&to=${to}`).catch(() => []));
    latest = readings.length ? readings[readings.length - 1] : null;
  }
  return { site, health, latest, state: (health && health.state) || site.state || "unknown" };
}

function siteCard(d) {
  const button = h("button", {
    class: `site-card card-${d.state}`, type: "button", "data-site": d.site.id,
    onclick: () => selectSite(d.site.id),
  },
  h("span", { class: "name" }, d.site.name || d.site.id),
  h("span", { class: "reading", title: "latest reading" }, d.latest ? degrees(readingValue(d.latest)) : "–"),
  h("span", {}, stateBadge(d.state)),
  h("span", { class: "meta" }, d.latest ? `latest ${ago(d.latest.time)}` : "no readings yet"));
  return h("li", {}, button);
}

const readingValue = r => (typeof r.value === "number" ? r.value : r.valueC);
const readingFlagged = r => (Array.isArray(r.flags) ? r.flags.length > 0 : Boolean(r.flags));

// ---- one site ------------------------------------------------------------------------------

async function selectSite(siteId) {
  state.selected = siteId;
  history.replaceState(null, "", `#site=${encodeURIComponent(siteId)}`);
  document.querySelectorAll(".site-card").forEach(b => b.setAttribute("aria-current", String(b.dataset.site === siteId)));
  const detail = document.getElementById("detail");
  detail.setAttribute("aria-busy", "true");
  const base = `/api/v1/sites/${encodeURIComponent(siteId)}`;
  const [site, health] = await Promise.all([getJson(base), getJson(`${base}/health`).catch(() => null)]);
  const hasModel = Boolean(health && health.modelFittedAt);
  const [model, forecast] = hasModel
    ? await Promise.all([getJson(`${base}/model`).catch(e => e), getJson(forecastPath(base)).catch(e => e)])
    : [null, null];
  const origin = forecast && !(forecast instanceof Error) && forecast.origin
    ? Date.parse(forecast.origin)
    : Date.parse((health && health.lastObservationAt) || new Date().toISOString());
  const from = new Date(origin - HISTORY_HOURS * 3600e3).toISOString();
  const to = new Date(origin + 1000).toISOString();
  const observations = listOf(await getJson(`${base}/observations?from=${from}&to=${to}`).catch(() => []));
  if (state.selected !== siteId) return;
  detail.replaceChildren(...renderSite({ site, health, model, forecast, observations }));
  detail.setAttribute("aria-busy", "false");
  if (hasModel && model && !(model instanceof Error)) {
    // The backtest can take seconds the first time; the rest of the page does not wait for it.
    const verification = await getJson(`${base}/verification`).catch(e => e);
    const placeholder = document.getElementById("verification-panel");
    if (state.selected === siteId && placeholder) placeholder.replaceWith(verificationPanel(verification));
  }
}

function forecastPath(base) {
  return `${base}/forecast?${new URLSearchParams({ levels: LEVELS.join(",") })}`;
}

function renderSite(data) {
  const { site, health, model, forecast } = data;
  const ok = v => v && !(v instanceof Error);
  const noModelReason = !health || !health.modelFittedAt
    ? `No model yet: ${reasonText(health) || "the site needs more data before a model can be fitted."}`
    : null;
  const parts = [riskPanel(site, ok(forecast) ? forecast : null, noModelReason || errorText(forecast)), siteHeader(site, health)];
  parts.push(h("div", { class: "row row-forecast" },
    forecastPanel(site, data.observations, ok(forecast) ? forecast : null, noModelReason || errorText(forecast)),
    ok(forecast) ? nextDayPanel(site, forecast) : unavailable("Tomorrow", noModelReason || errorText(forecast))));
  parts.push(thresholdEditor(site));
  parts.push(h("h2", { class: "diagnostics-heading", id: "diagnostics-heading" }, "Behind the forecast: how the model was built and how well it has done"));
  if (ok(model)) {
    parts.push(h("div", { class: "row row-three" }, acfPanel(model), pacfPanel(model), criteriaPanel(model)));
    parts.push(h("div", { class: "row row-three" }, modelPanel(model), residualPanel(model),
      h("section", { class: "panel", id: "verification-panel", "aria-busy": "true" }, h("h3", {}, "Verification"),
        h("p", { class: "note" }, "Running the backtest over this site's history…"))));
  } else {
    parts.push(unavailable("Model, autocorrelation and verification", noModelReason || errorText(model)));
  }
  parts.push(cautionsPanel(ok(forecast) ? forecast.cautions : null));
  return parts;
}

const errorText = v => (v instanceof Error ? `Not available: ${v.message}` : "Not available.");
const reasonText = health => (health && Array.isArray(health.reasons) ? health.reasons.map(r => r.message).join(" ") : "");

function siteHeader(site, health) {
  const facts = [
    site.id,
    site.cadence,
    site.timeZone,
    typeof site.elevationM === "number" ? `${site.elevationM} m above sea level` : null,
  ].filter(Boolean).join(" · ");
  const reasons = health && Array.isArray(health.reasons) ? health.reasons : [];
  return h("div", { class: "site-head" },
    h("div", {},
      h("h2", {}, site.name || site.id),
      h("p", { class: "facts" }, facts),
      h("p", { class: "facts" },
        `Last reading ${health && health.lastObservationAt ? `${localTime(health.lastObservationAt, site.timeZone)} (${ago(health.lastObservationAt)})` : "none"}`,
        ` · model fitted ${health && health.modelFittedAt ? localTime(health.modelFittedAt, site.timeZone) : "not yet"}`)),
    h("div", {},
      h("p", { class: "facts" }, "Model health: ", stateBadge(health ? health.state : "unknown")),
      reasons.length ? h("ul", { class: "reasons" }, reasons.map(r => h("li", {}, r.message, " ", h("code", {}, `(${r.code})`)))) : null));
}

function forecastPanel(site, observations, forecast, missingText) {
  const historyPoints = observations.map(r => ({ t: Date.parse(r.time), value: readingValue(r), flagged: readingFlagged(r) }));
  const steps = forecast ? forecast.steps.map(stepPoint) : [];
  const chart = Charts.forecast(historyPoints, steps, {
    originMs: forecast ? Date.parse(forecast.origin) : NaN,
    threshold: (site.thresholds || []).length ? site.thresholds[0].valueC : NaN,
    unit: "°C",
    timeZone: site.timeZone,
  });
  const legend = h("ul", { class: "legend" },
    h("li", {}, h("span", { class: "swatch history" }), "measured (solid)"),
    forecast ? h("li", {}, h("span", { class: "swatch forecast" }), "forecast mean (dashed)") : null,
    forecast ? h("li", {}, h("span", { class: "swatch b80" }), "80 % interval (darker)") : null,
    forecast ? h("li", {}, h("span", { class: "swatch b95" }), "95 % interval (lighter)") : null,
    (site.thresholds || []).length ? h("li", {}, h("span", { class: "swatch threshold" }), `${site.thresholds[0].id} ${num(site.thresholds[0].valueC)} °C (dotted)`) : null,
    historyPoints.some(p => p.flagged) ? h("li", {}, h("span", { class: "swatch flag" }), "flagged reading (×), left out of fitting") : null);
  const why = forecast
    ? `Last ${HISTORY_HOURS} hours measured, then ${forecast.steps.length} steps ahead from ${localTime(forecast.origin, site.timeZone)}. ` +
      `Model AR(${forecast.model ? forecast.model.order : "?"}), ${forecast.model ? forecast.model.method : ""}.`
    : `Last ${HISTORY_HOURS} hours measured. ${missingText || ""}`;
  const gap = forecast && forecast.missingRecentData
    ? h("p", { class: "gap-note", role: "note" }, forecast.missingRecentData.message)
    : null;
  return h("section", { class: "panel", id: "forecast-panel" }, h("h3", {}, "History and forecast (°C)"), h("p", { class: "why" }, why), gap, chart, legend);
}

function stepPoint(step) {
  const interval = level => (step.intervals || []).find(i => Number(i.level) === level) || {};
  return {
    t: Date.parse(step.time), mean: step.mean,
    lo80: interval(80).lower, hi80: interval(80).upper,
    lo95: interval(95).lower, hi95: interval(95).upper,
  };
}

function nextDayPanel(site, forecast) {
  const day = forecast.nextDay;
  if (!day) {
    return panel("Tomorrow", "The next-day summary is given for hourly sites; a daily site's risk for tomorrow is at the top.");
  }
  const interval80 = s => {
    const i = (s && s.intervals || []).find(x => Number(x.level) === 80);
    return i ? `80 %: ${num(i.lower)} to ${num(i.upper)} °C` : "";
  };
  const row = (label, s) => [h("dt", {}, label), h("dd", {}, h("span", { class: "big" }, degrees(s && s.mean)), h("span", { class: "range" }, interval80(s)))];
  const probabilities = (forecast.risk || []).filter(r => r.window.name === "next24h").map(r => ({ threshold: r.threshold, direction: r.direction, probability: r.probability })).map(p => {
    const words = p.direction === "above"
      ? `chance of rising above ${num(p.threshold)} °C in the next 24 hours`
      : `chance of falling below ${num(p.threshold)} °C in the next 24 hours`;
    const meter = h("span", { class: "meter", role: "presentation" }, h("span", {}));
    meter.firstChild.style.width = `${Math.round(100 * Math.min(1, Math.max(0, p.probability)))}%`;
    return h("div", { class: "probability", "data-direction": p.direction },
      h("span", { class: "value" }, percent(p.probability)), meter, h("span", { class: "text" }, words));
  });
  return h("section", { class: "panel nextday", id: "nextday-panel" },
    h("h3", {}, "Tomorrow"),
    h("p", { class: "date" }, `${day.date}, local day in ${site.timeZone}; from simulated paths of the model.`),
    h("dl", {}, row("Minimum", day.min), row("Maximum", day.max), row("Mean", day.mean)),
    probabilities.length ? probabilities : h("p", { class: "note" }, "No threshold set for this site."));
}

// ---- risk: the coming night first --------------------------------------------------------

const CONFIDENCE_LABELS = {
  "stale": "the data or the model is out of date",
  "sensor-suspect": "the sensor looks suspect",
  "drifting": "the model no longer fits this site well",
};

function riskPanel(site, forecast, missingText) {
  const daily = site.cadence === "daily";
  const title = daily ? `Tomorrow at ${site.name || site.id}` : `Tonight at ${site.name || site.id}`;
  if (!forecast) {
    return h("section", { class: "panel risk unavailable", id: "risk-panel" }, h("h2", {}, title), h("p", { class: "note" }, missingText || "No forecast yet."));
  }
  const windowName = daily ? "next24h" : "night";
  const risks = (forecast.risk || []).filter(r => r.window.name === windowName && r.id);
  const confidence = forecast.confidence === "reduced" && forecast.confidenceReason
    ? h("p", { class: "confidence reduced", id: "confidence", "data-reason": forecast.confidenceReason.code, role: "note" },
      h("strong", {}, `Reduced confidence: ${CONFIDENCE_LABELS[forecast.confidenceReason.code] || forecast.confidenceReason.code}. `),
      forecast.confidenceReason.message)
    : null;
  const first = risks[0];
  const span = first
    ? `${localTime(first.window.from, site.timeZone)} to ${localTime(first.window.to, site.timeZone)}`
    : "";
  const body = risks.length
    ? risks.map(r => riskRow(site, forecast, r, daily))
    : [h("p", { class: "note" }, "No thresholds set for this site yet. Add the level that matters (for example frost below 0 °C) under “Thresholds for this site” below.")];
  return h("section", { class: "panel risk", id: "risk-panel" },
    h("h2", {}, title),
    span ? h("p", { class: "why" }, `${daily ? "The next local day" : "The night"}, ${span} (${site.timeZone}). Chances from simulated paths of this site's model.`) : null,
    confidence,
    ...body);
}

function riskRow(site, forecast, r, daily) {
  const verb = r.direction === "below" ? "below" : "above";
  const alerting = typeof r.alertProbability === "number" && r.probability >= r.alertProbability;
  const crossing = r.firstCrossing
    ? `Most likely first ${verb} at ${localTime(r.firstCrossing.median, site.timeZone, false)}` +
      (r.firstCrossing.p10 !== r.firstCrossing.p90 ? ` (8 in 10 paths between ${localTime(r.firstCrossing.p10, site.timeZone, false)} and ${localTime(r.firstCrossing.p90, site.timeZone, false)})` : "") + "."
    : `No simulated path goes ${verb} ${num(r.threshold)} °C.`;
  const hours = typeof r.expectedHoursBeyond === "number" ? `Expected ${num(r.expectedHoursBeyond)} hours ${verb}.` : "";
  const steps = (forecast.steps || []).filter(s => Date.parse(s.time) + 3600e3 > Date.parse(r.window.from) && Date.parse(s.time) < Date.parse(r.window.to));
  return h("div", { class: `risk-row${alerting ? " alerting" : ""}`, "data-threshold": r.id, "data-probability": r.probability },
    h("div", { class: "risk-head" },
      h("span", { class: "risk-chance" }, percent(r.probability)),
      h("span", { class: "risk-label" }, `chance of ${r.id}: ${verb} ${num(r.threshold)} °C${daily ? " tomorrow" : " tonight"}`,
        alerting ? h("span", { class: "alert-flag" }, ` at or above the alert level of ${percent(r.alertProbability)}`) : null)),
    daily ? null : hourStrip(site, steps, r),
    h("p", { class: "risk-facts" }, crossing, " ", hours));
}

// One cell per hour of the window; the darker the cell, the likelier that hour is beyond the threshold.
function hourStrip(site, steps, r) {
  const width = 360, height = 46, cell = steps.length ? width / steps.length : width;
  const ns = "http://www.w3.org/2000/svg";
  const root = document.createElementNS(ns, "svg");
  root.setAttribute("viewBox", `0 0 ${width} ${height}`);
  root.setAttribute("class", "risk-strip");
  root.setAttribute("role", "img");
  root.setAttribute("data-hours", String(steps.length));
  root.setAttribute("aria-label", `Chance per hour of being ${r.direction} ${r.threshold} °C`);
  steps.forEach((s, i) => {
    const p = ((s.probabilities || []).find(x => x.id === r.id) || {}).probability || 0;
    const rect = document.createElementNS(ns, "rect");
    rect.setAttribute("class", "hour");
    rect.setAttribute("x", String(i * cell + 0.5));
    rect.setAttribute("y", "2");
    rect.setAttribute("width", String(Math.max(1, cell - 1)));
    rect.setAttribute("height", "26");
    rect.setAttribute("fill-opacity", String(0.08 + 0.92 * Math.min(1, Math.max(0, p))));
    rect.setAttribute("data-probability", String(p));
    const tip = document.createElementNS(ns, "title");
    tip.textContent = `${localTime(s.time, site.timeZone, false)}: ${percent(p)}`;
    rect.appendChild(tip);
    root.appendChild(rect);
    if (i % 3 === 0) {
      const label = document.createElementNS(ns, "text");
      label.setAttribute("x", String(i * cell + 1));
      label.setAttribute("y", "42");
      label.textContent = localTime(s.time, site.timeZone, false);
      root.appendChild(label);
    }
  });
  return root;
}

// ---- thresholds, kept by the service --------------------------------------------------------

function thresholdEditor(site) {
  const rows = h("div", { class: "threshold-rows" });
  const addRow = t => {
    const row = h("div", { class: "threshold-row" },
      h("label", {}, "Name", h("input", { class: "t-id", value: t.id || "", placeholder: "frost", required: true, pattern: "[a-z0-9][a-z0-9\\-]{0,31}" })),
      h("label", {}, "When",
        h("select", { class: "t-direction" },
          h("option", { value: "below", selected: t.direction !== "above" }, "below"),
          h("option", { value: "above", selected: t.direction === "above" }, "above"))),
      h("label", {}, "°C", h("input", { class: "t-value", type: "number", step: "0.1", value: t.valueC ?? "", required: true })),
      h("label", {}, "Alert at %", h("input", { class: "t-alert", type: "number", min: "1", max: "100", step: "1", value: typeof t.alertProbability === "number" ? Math.round(t.alertProbability * 100) : "", placeholder: "never" })),
      h("button", { type: "button", class: "t-remove", onclick: () => { row.remove(); state.editing = true; } }, "Remove"));
    rows.appendChild(row);
  };
  (site.thresholds || []).forEach(addRow);
  const night = site.night || { startLocal: "18:00", endLocal: "09:00" };
  const status = h("p", { class: "note", id: "threshold-status", role: "status" });
  const form = h("form", { class: "threshold-editor", id: "threshold-editor", oninput: () => { state.editing = true; } },
    rows,
    h("p", {}, h("button", { type: "button", class: "t-add", onclick: () => { addRow({ direction: "below" }); state.editing = true; } }, "Add a threshold")),
    site.cadence === "daily" ? null : h("p", { class: "night-hours" },
      h("label", {}, "Night from ", h("input", { id: "night-start", type: "time", value: night.startLocal })),
      h("label", {}, " to ", h("input", { id: "night-end", type: "time", value: night.endLocal })),
      ` local time (${site.timeZone})`),
    h("button", { type: "submit", id: "threshold-save" }, "Save thresholds"),
    status);
  form.addEventListener("submit", async event => {
    event.preventDefault();
    const thresholds = [...rows.querySelectorAll(".threshold-row")].map(row => {
      const alert = parseFloat(row.querySelector(".t-alert").value);
      return {
        id: row.querySelector(".t-id").value.trim(),
        direction: row.querySelector(".t-direction").value,
        valueC: parseFloat(row.querySelector(".t-value").value),
        alertProbability: isFinite(alert) ? alert / 100 : null,
      };
    });
    const body = { thresholds };
    if (site.cadence !== "daily") body.night = { startLocal: form.querySelector("#night-start").value, endLocal: form.querySelector("#night-end").value };
    status.textContent = "Saving…";
    try {
      await getJson(`/api/v1/sites/${encodeURIComponent(site.id)}`, { method: "PATCH", body: JSON.stringify(body) });
      state.editing = false;
      status.textContent = "Saved.";
      await selectSite(site.id);
    } catch (error) {
      status.textContent = error.status === 401 || error.status === 403
        ? "Saving thresholds needs an admin key: enter it in the API key field at the top and save again."
        : `Not saved: ${problemText(error)}`;
    }
  });
  return h("section", { class: "panel thresholds", id: "thresholds-panel" },
    h("h3", {}, "Thresholds for this site"),
    h("p", { class: "why" }, "The levels that matter here, kept by the service for everyone who watches this site. Without an alert level a threshold is shown but never alerts."),
    form);
}

function problemText(error) {
  const errors = error.problem && error.problem.errors;
  return errors ? Object.values(errors).flat().join(" ") : error.message;
}

function acfPanel(model) {
  const band = model.orderSelection ? model.orderSelection.band : NaN;
  const points = (model.acf || []).filter(p => p.lag > 0);
  return panel("Autocorrelation (ACF) of the anomaly",
    "How strongly the deseasonalised series resembles itself k steps back. Dashed lines: 95 % band ±z/√n.",
    Charts.correlogram(points, { title: "ACF by lag", band, yLabel: "ACF" }),
    bandLegend());
}

function pacfPanel(model) {
  const sel = model.orderSelection || {};
  return panel("Partial autocorrelation (PACF)",
    `The PACF proposes: the last lag outside the band is P = ${sel.pacfCutoff ?? "–"} (searched up to ${sel.maxOrder ?? "–"}).`,
    Charts.correlogram(sel.pacf || [], { title: "PACF by lag", band: sel.band, cutoff: sel.pacfCutoff, yLabel: "PACF" }),
    bandLegend());
}

const bandLegend = () => h("ul", { class: "legend" },
  h("li", {}, h("span", { class: "swatch outside" }), "outside band (filled)"),
  h("li", {}, h("span", { class: "swatch inside" }), "inside band (hollow)"),
  h("li", {}, h("span", { class: "swatch bandline" }), "band"));

function criteriaPanel(model) {
  const sel = model.orderSelection || {};
  const rows = sel.criteria || [];
  const chosen = rows.find(r => r.order === sel.chosenOrder);
  return panel("AIC by order",
    `The AIC decides among orders 0..P: it chose p = ${sel.chosenOrder ?? "–"}${chosen ? ` (AIC ${num(chosen.aic, 1)})` : ""}; policy ${sel.policy || "–"}.`,
    rows.length ? Charts.criteria(rows, sel.chosenOrder, sel.pacfCutoff) : h("p", { class: "note" }, "No criteria reported."),
    h("ul", { class: "legend" },
      h("li", {}, "● AIC (solid)"), h("li", {}, "□ BIC (dashed)"), h("li", {}, "◯ chosen order"), h("li", {}, "shaded: orders 0..P")));
}

function modelPanel(model) {
  const ar = model.ar || {};
  const coefficients = (ar.coefficients || []).map(c => [`φ${c.lag}`, num(c.value, 4), num(c.stdError, 4)]);
  const window = model.window || {};
  const roots = Array.isArray(ar.roots) ? ar.roots : [];
  const modulus = r => (typeof r === "number" ? Math.abs(r) : typeof r.modulus === "number" ? r.modulus : Math.hypot(r.real ?? r.re ?? 0, r.imaginary ?? r.im ?? 0));
  const minRoot = roots.length ? Math.min(...roots.map(modulus)) : NaN;
  return panel(`AR(${ar.order ?? "–"}) model`,
    `${ar.method || ""} estimate on the anomaly; fitted ${model.fittedAt ? new Date(model.fittedAt).toISOString().slice(0, 16).replace("T", " ") + " UTC" : "–"} in ${num(model.fitDurationMs, 0)} ms.`,
    coefficients.length ? table(["term", "value", "std. error"], coefficients, { id: "coefficients" }) : h("p", { class: "note" }, "AR(0): the anomaly is treated as white noise."),
    table(["quantity", "value"], [
      ["anomaly mean", degrees(ar.mean, 3)],
      ["innovation variance", `${num(ar.innovationVariance, 4)} °C²`],
      ["stationary", ar.stationary === undefined ? "–" : ar.stationary ? "yes" : "no"],
      ["smallest root modulus", num(minRoot, 3)],
      ["fit window points", window.points ?? "–"],
      ["interpolated points", window.interpolated ?? "–"],
      ["segments", Array.isArray(window.segments) ? window.segments.length : (window.segments ?? "–")],
    ]));
}

function residualPanel(model) {
  const r = model.residuals || {};
  const lb = r.ljungBox || {};
  const jb = r.jarqueBera || {};
  const verdict = (p, good, bad) => (typeof p === "number"
    ? h("span", { class: `verdict ${p >= 0.05 ? "pass" : "fail"}` }, p >= 0.05 ? good : bad)
    : "–");
  return panel("Residual diagnostics",
    "One-step residuals of the fitted model. White residuals mean the AR order caught the structure.",
    table(["test", "statistic", "p-value", "reading"], [
      [`Ljung-Box (${lb.lags ?? "?"} lags, df ${lb.df ?? "?"})`, num(lb.statistic, 2), num(lb.pValue, 3), verdict(lb.pValue, "white", "autocorrelated")],
      ["Jarque-Bera (normality)", num(jb.statistic, 2), num(jb.pValue, 3), verdict(jb.pValue, "normal", "not normal")],
    ], { id: "residual-tests" }),
    table(["moment", "value"], [
      ["mean", degrees(r.mean, 3)],
      ["standard deviation", degrees(r.sd, 3)],
      ["skewness", num(r.skewness, 2)],
      ["kurtosis", num(r.kurtosis, 2)],
    ]));
}

function verificationPanel(verification) {
  if (!verification || verification instanceof Error) {
    const missing = unavailable("Verification", errorText(verification));
    missing.id = "verification-panel";
    return missing;
  }
  const backtest = verification.backtest;
  const live = verification.live || {};
  const columns = [backtest ? backtest.pooled : null, live.pooled || null];
  const cell = (scores, pick) => (scores ? pick(scores) : "–");
  const level = (scores, lv, key) => {
    const i = scores && (scores.intervals || []).find(x => Number(x.level) === lv);
    return i ? i[key] : NaN;
  };
  const rows = [
    ["MAE", s => degrees(s.mae, 2)],
    ["RMSE", s => degrees(s.rmse, 2)],
    ["bias (forecast − observed)", s => degrees(s.bias, 2)],
    ["skill vs persistence", s => num(s.skillVsPersistence, 2)],
    ["skill vs climatology", s => num(s.skillVsClimatology, 2)],
    ["CRPS", s => degrees(s.crps, 2)],
    ["80 % interval covers", s => percent(level(s, 80, "coverage"))],
    ["95 % interval covers", s => percent(level(s, 95, "coverage"))],
    ["95 % mean width", s => degrees(level(s, 95, "meanWidth"), 1)],
  ].map(([label, pick]) => [label, ...columns.map(c => cell(c, pick))]);
  const why = backtest
    ? `Backtest: ${backtest.origins} daily origins, refitted every ${backtest.refitEveryDays} days, each forecasting the next day. ` +
      `Skill 1 − MSE/MSE_ref: above 0 beats the reference. Live: ${live.days || 0} scored days of archived forecasts.`
    : "The history is too short for a backtest yet.";
  const horizons = backtest ? backtest.horizons || [] : [];
  const chart = horizons.length
    ? Charts.lines([
      { label: "model", cls: "model", points: horizons.map(s => ({ x: s.horizon, y: s.mae })) },
      { label: "persistence", cls: "persistence", points: horizons.map(s => ({ x: s.horizon, y: s.persistenceMae })) },
      { label: "climatology", cls: "climatology", points: horizons.map(s => ({ x: s.horizon, y: s.climatologyMae })) },
    ], { title: "Mean absolute error by lead time", xLabel: "Lead time (steps ahead)", yLabel: "MAE (°C)" })
    : null;
  return h("section", { class: "panel", id: "verification-panel" }, h("h3", {}, "Verification"), h("p", { class: "why" }, why),
    table(["score", "backtest", "live"], rows, { id: "verification-scores" }),
    chart,
    chart ? h("ul", { class: "legend" },
      h("li", {}, h("span", { class: "swatch model" }), "model (solid)"),
      h("li", {}, h("span", { class: "swatch persistence" }), "persistence (dashed)"),
      h("li", {}, h("span", { class: "swatch climatology" }), "climatology (dotted)")) : null);
}

function cautionsPanel(cautions) {
  const list = Array.isArray(cautions) && cautions.length
    ? cautions.map(c => (typeof c === "string" ? c : c.message || c.text || JSON.stringify(c)))
    : [document.getElementById("caution-banner").textContent.trim().replace(/\s+/g, " ")];
  return h("section", { class: "cautions", id: "cautions" }, h("h3", {}, "Cautions"), h("ul", {}, list.map(c => h("li", {}, c))));
}

// ---- start ---------------------------------------------------------------------------------

document.getElementById("key-form").addEventListener("submit", event => {
  event.preventDefault();
  const key = document.getElementById("api-key").value.trim();
  if (key) sessionStorage.setItem(KEY_STORAGE, key); else sessionStorage.removeItem(KEY_STORAGE);
  loadFleet();
});

// Refresh the selected site unless its thresholds are being edited.
setInterval(() => {
  if (state.selected && !state.editing && !document.hidden) selectSite(state.selected).catch(() => {});
}, REFRESH_MS);

loadFleet().catch(error => {
  document.getElementById("fleet-summary").textContent = `Could not load the dashboard: ${error.message}`;
});
