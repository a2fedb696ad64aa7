// ForecastHub dashboard: reads the v1 API and draws everything as inline SVG and HTML.
"use strict";

const KEY_STORAGE = "forecasthub.apiKey";
const HISTORY_HOURS = 72;
// Each card costs two calls; more sites than this are counted but not drawn (rate limits, page size).
const MAX_CARDS = 24;
const LEVELS = [80, 95];
const state = { sites: [], selected: null, below: 0, above: null };

class ApiError extends Error {
  constructor(status, problem) {
    super((problem && (problem.detail || problem.title)) || `HTTP ${status}`);
    this.status = status;
    this.problem = problem;
  }
}

async function getJson(path) {
  const headers = { Accept: "application/json" };
  const key = sessionStorage.getItem(KEY_STORAGE);
  if (key) headers.Authorization = `Bearer ${key}`;
  const response = await fetch(path, { headers });
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
  const params = new URLSearchParams({ levels: LEVELS.join(",") });
  if (isFinite(state.below)) params.set("below", String(state.below));
  if (state.above !== null && isFinite(state.above)) params.set("above", String(state.above));
  return `${base}/forecast?${params}`;
}

function renderSite(data) {
  const { site, health, model, forecast } = data;
  const ok = v => v && !(v instanceof Error);
  const parts = [siteHeader(site, health)];
  const noModelReason = !health || !health.modelFittedAt
    ? `No model yet: ${reasonText(health) || "the site needs more data before a model can be fitted."}`
    : null;
  parts.push(h("div", { class: "row row-forecast" },
    forecastPanel(site, data.observations, ok(forecast) ? forecast : null, noModelReason || errorText(forecast)),
    ok(forecast) ? nextDayPanel(site, forecast) : unavailable("Tomorrow", noModelReason || errorText(forecast))));
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
    threshold: state.below,
    unit: "°C",
    timeZone: site.timeZone,
  });
  const legend = h("ul", { class: "legend" },
    h("li", {}, h("span", { class: "swatch history" }), "measured (solid)"),
    forecast ? h("li", {}, h("span", { class: "swatch forecast" }), "forecast mean (dashed)") : null,
    forecast ? h("li", {}, h("span", { class: "swatch b80" }), "80 % interval (darker)") : null,
    forecast ? h("li", {}, h("span", { class: "swatch b95" }), "95 % interval (lighter)") : null,
    h("li", {}, h("span", { class: "swatch threshold" }), `threshold ${num(state.below)} °C (dotted)`),
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
  const form = h("form", { class: "threshold-form", id: "threshold-form" },
    h("label", { for: "below" }, "Below"),
    h("input", { id: "below", type: "number", step: "0.5", value: state.below, "aria-describedby": "below-hint" }),
    h("span", { id: "below-hint" }, "°C"),
    h("label", { for: "above" }, "above"),
    h("input", { id: "above", type: "number", step: "0.5", value: state.above ?? "", placeholder: "none" }),
    h("span", {}, "°C"),
    h("button", { type: "submit" }, "Update"));
  form.addEventListener("submit", event => {
    event.preventDefault();
    const below = parseFloat(form.querySelector("#below").value);
    const above = parseFloat(form.querySelector("#above").value);
    state.below = isFinite(below) ? below : 0;
    state.above = isFinite(above) ? above : null;
    selectSite(state.selected);
  });
  if (!day) {
    return panel("Tomorrow", "The next-day summary is given for hourly sites.", form);
  }
  const interval80 = s => {
    const i = (s && s.intervals || []).find(x => Number(x.level) === 80);
    return i ? `80 %: ${num(i.lower)} to ${num(i.upper)} °C` : "";
  };
  const row = (label, s) => [h("dt", {}, label), h("dd", {}, h("span", { class: "big" }, degrees(s && s.mean)), h("span", { class: "range" }, interval80(s)))];
  const probabilities = (day.probabilities || []).map(p => {
    const words = p.direction === "above"
      ? `chance the temperature rises above ${num(p.threshold)} °C on ${day.date}`
      : `chance the temperature falls below ${num(p.threshold)} °C on ${day.date}`;
    const meter = h("span", { class: "meter", role: "presentation" }, h("span", {}));
    meter.firstChild.style.width = `${Math.round(100 * Math.min(1, Math.max(0, p.probability)))}%`;
    return h("div", { class: "probability", "data-direction": p.direction },
      h("span", { class: "value" }, percent(p.probability)), meter, h("span", { class: "text" }, words));
  });
  return h("section", { class: "panel nextday", id: "nextday-panel" },
    h("h3", {}, "Tomorrow"),
    h("p", { class: "date" }, `${day.date}, local day in ${site.timeZone}; from simulated paths of the model.`),
    h("dl", {}, row("Minimum", day.min), row("Maximum", day.max), row("Mean", day.mean)),
    form,
    probabilities.length ? probabilities : h("p", { class: "note" }, "No threshold asked."));
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

loadFleet().catch(error => {
  document.getElementById("fleet-summary").textContent = `Could not load the dashboard: ${error.message}`;
});
