// Small inline-SVG chart helpers for the dashboard: no libraries, no build step.
"use strict";

const Charts = (() => {
  const SVG_NS = "http://www.w3.org/2000/svg";

  function svg(name, attrs, parent) {
    const node = document.createElementNS(SVG_NS, name);
    for (const [key, value] of Object.entries(attrs || {})) {
      if (value !== undefined && value !== null) node.setAttribute(key, String(value));
    }
    if (parent) parent.appendChild(node);
    return node;
  }

  function text(parent, x, y, content, attrs) {
    const node = svg("text", Object.assign({ x, y }, attrs || {}), parent);
    node.textContent = content;
    return node;
  }

  function linear(d0, d1, r0, r1) {
    const span = d1 - d0 || 1;
    return v => r0 + ((v - d0) / span) * (r1 - r0);
  }

  // Round tick steps (1, 2, 2.5, 5 x 10^k) covering [min, max].
  function ticks(min, max, count) {
    if (!(isFinite(min) && isFinite(max))) return [];
    if (min === max) { min -= 1; max += 1; }
    const raw = (max - min) / Math.max(1, count);
    const power = Math.pow(10, Math.floor(Math.log10(raw)));
    const step = [1, 2, 2.5, 5, 10].map(m => m * power).find(s => s >= raw) || raw;
    const out = [];
    for (let v = Math.ceil(min / step) * step; v <= max + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
    return out;
  }

  function extent(values) {
    let lo = Infinity, hi = -Infinity;
    for (const v of values) { if (isFinite(v)) { if (v < lo) lo = v; if (v > hi) hi = v; } }
    return [lo, hi];
  }

  function frame(width, height, title) {
    const root = svg("svg", { viewBox: `0 0 ${width} ${height}`, class: "chart", role: "img" });
    svg("title", {}, root).textContent = title;
    return root;
  }

  function yAxis(root, y, tickValues, left, right, label, format) {
    const grid = svg("g", { class: "grid" }, root);
    const axis = svg("g", { class: "axis" }, root);
    for (const t of tickValues) {
      svg("line", { x1: left, x2: right, y1: y(t), y2: y(t) }, grid);
      text(axis, left - 6, y(t) + 3.5, format(t), { "text-anchor": "end" });
    }
    const mid = (y(tickValues[0]) + y(tickValues[tickValues.length - 1])) / 2;
    text(root, 12, mid, label, { class: "axis-title", transform: `rotate(-90 12 ${mid})`, "text-anchor": "middle" });
  }

  function pathFrom(points, gapMs) {
    let d = "";
    let previous = null;
    for (const p of points) {
      const jump = previous === null || (gapMs && p.t - previous.t > gapMs);
      d += `${jump ? "M" : "L"}${p.x.toFixed(1)},${p.y.toFixed(1)}`;
      previous = p;
    }
    return d;
  }

  function bandPath(points, lowerKey, upperKey, x, y) {
    const upper = points.map(p => `${x(p.t).toFixed(1)},${y(p[upperKey]).toFixed(1)}`);
    const lower = points.slice().reverse().map(p => `${x(p.t).toFixed(1)},${y(p[lowerKey]).toFixed(1)}`);
    return `M${upper.join("L")}L${lower.join("L")}Z`;
  }

  /**
   * History and forecast with 80/95 bands.
   * history: [{t (ms), value, flagged}], forecast: [{t, mean, lo80, hi80, lo95, hi95}],
   * opts: {originMs, threshold, unit, timeZone}
   */
  function forecast(history, forecastSteps, opts) {
    const W = 760, H = 330, left = 52, right = W - 14, top = 16, bottom = H - 42;
    const root = frame(W, H, `Temperature history and forecast, ${opts.unit}`);
    const times = history.map(p => p.t).concat(forecastSteps.map(p => p.t));
    const values = history.map(p => p.value).concat(
      forecastSteps.flatMap(p => [p.lo95, p.hi95, p.lo80, p.hi80, p.mean]));
    if (isFinite(opts.threshold)) values.push(opts.threshold);
    let [lo, hi] = extent(values);
    const pad = Math.max(0.5, (hi - lo) * 0.06);
    lo -= pad; hi += pad;
    const [t0, t1] = extent(times);
    const x = linear(t0, t1, left, right);
    const y = linear(lo, hi, bottom, top);
    yAxis(root, y, ticks(lo, hi, 6), left, right, `Temperature (${opts.unit})`, v => v.toFixed(Math.abs(hi - lo) < 4 ? 1 : 0));
    timeAxis(root, x, t0, t1, bottom, opts.timeZone);

    const bands = forecastSteps.filter(p => isFinite(p.lo95) && isFinite(p.hi95));
    if (bands.length) svg("path", { class: "band-95", d: bandPath(bands, "lo95", "hi95", x, y), "data-points": bands.length }, root);
    const bands80 = forecastSteps.filter(p => isFinite(p.lo80) && isFinite(p.hi80));
    if (bands80.length) svg("path", { class: "band-80", d: bandPath(bands80, "lo80", "hi80", x, y), "data-points": bands80.length }, root);

    if (isFinite(opts.threshold) && opts.threshold >= lo && opts.threshold <= hi) {
      svg("line", { class: "threshold", x1: left, x2: right, y1: y(opts.threshold), y2: y(opts.threshold) }, root);
      text(root, left + 4, y(opts.threshold) - 4, `threshold ${opts.threshold} ${opts.unit}`, { class: "threshold-label" });
    }
    if (isFinite(opts.originMs)) {
      svg("line", { class: "origin", x1: x(opts.originMs), x2: x(opts.originMs), y1: top, y2: bottom }, root);
      text(root, x(opts.originMs) + 4, top + 10, "forecast from here", {});
    }
    const historyPoints = history.filter(p => isFinite(p.value)).map(p => ({ t: p.t, x: x(p.t), y: y(p.value) }));
    if (historyPoints.length) {
      svg("path", { class: "history", d: pathFrom(historyPoints, 2.5 * 3600e3), "data-points": historyPoints.length }, root);
    }
    for (const p of history.filter(h => h.flagged && isFinite(h.value))) {
      const cx = x(p.t), cy = y(p.value);
      svg("path", { class: "flagged", d: `M${cx - 3},${cy - 3}L${cx + 3},${cy + 3}M${cx - 3},${cy + 3}L${cx + 3},${cy - 3}` }, root);
    }
    const meanPoints = forecastSteps.filter(p => isFinite(p.mean)).map(p => ({ t: p.t, x: x(p.t), y: y(p.mean) }));
    if (meanPoints.length) svg("path", { class: "forecast-mean", d: pathFrom(meanPoints), "data-points": meanPoints.length }, root);
    return root;
  }

  function timeAxis(root, x, t0, t1, bottom, timeZone) {
    const axis = svg("g", { class: "axis" }, root);
    svg("line", { x1: x(t0), x2: x(t1), y1: bottom, y2: bottom }, axis);
    const spanHours = (t1 - t0) / 3600e3;
    const stepHours = spanHours > 240 ? 48 : spanHours > 96 ? 24 : spanHours > 36 ? 12 : 6;
    const dayFormat = new Intl.DateTimeFormat("en-GB", { timeZone, weekday: "short", day: "numeric", month: "short" });
    const hourFormat = new Intl.DateTimeFormat("en-GB", { timeZone, hour: "2-digit", minute: "2-digit", hourCycle: "h23" });
    const first = Math.ceil(t0 / 3600e3) * 3600e3;
    for (let t = first; t <= t1; t += 3600e3) {
      const hour = Number(hourFormat.format(t).slice(0, 2));
      if (hour % stepHours !== 0) continue;
      const label = hour === 0 ? dayFormat.format(t) : hourFormat.format(t);
      svg("line", { x1: x(t), x2: x(t), y1: bottom, y2: bottom + 5 }, axis);
      text(axis, x(t), bottom + 17, label, { "text-anchor": "middle" });
    }
    text(root, (x(t0) + x(t1)) / 2, bottom + 36, `Local time (${timeZone})`, { class: "axis-title", "text-anchor": "middle" });
  }

  /**
   * Correlogram: bars by lag with a +-band. Bars outside the band are filled, inside hollow.
   * opts: {title, band, cutoff, yLabel}
   */
  function correlogram(points, opts) {
    const W = 360, H = 230, left = 46, right = W - 10, top = 14, bottom = H - 38;
    const root = frame(W, H, opts.title);
    const lags = points.map(p => p.lag);
    const maxLag = Math.max(1, ...lags);
    const minLag = Math.min(...lags, 1);
    let [lo, hi] = extent(points.map(p => p.value).concat([opts.band || 0, -(opts.band || 0), 0]));
    lo = Math.min(lo, -0.1); hi = Math.max(hi, 0.1);
    const pad = (hi - lo) * 0.05;
    lo -= pad; hi += pad;
    const x = linear(minLag - 0.6, maxLag + 0.6, left, right);
    const y = linear(lo, hi, bottom, top);
    yAxis(root, y, ticks(lo, hi, 5), left, right, opts.yLabel, v => v.toFixed(1));
    const axis = svg("g", { class: "axis" }, root);
    svg("line", { x1: left, x2: right, y1: y(0), y2: y(0) }, axis);
    for (const t of ticks(minLag, maxLag, 6).filter(Number.isInteger)) text(axis, x(t), bottom + 15, String(t), { "text-anchor": "middle" });
    text(root, (left + right) / 2, bottom + 32, "Lag (steps)", { class: "axis-title", "text-anchor": "middle" });

    const width = Math.max(1.5, Math.min(14, ((right - left) / (maxLag - minLag + 2)) * 0.7));
    const bars = svg("g", { class: "bars" }, root);
    for (const p of points) {
      const outside = opts.band > 0 && Math.abs(p.value) > opts.band;
      const y0 = y(Math.max(0, p.value)), y1 = y(Math.min(0, p.value));
      const bar = svg("rect", { class: outside ? "bar" : "bar inside", x: x(p.lag) - width / 2, y: y0, width, height: Math.max(0.5, y1 - y0), "data-lag": p.lag }, bars);
      svg("title", {}, bar).textContent = `lag ${p.lag}: ${p.value.toFixed(3)}${outside ? " (outside band)" : ""}`;
    }
    if (opts.band > 0) {
      for (const b of [opts.band, -opts.band]) svg("line", { class: "band-line", x1: left, x2: right, y1: y(b), y2: y(b) }, root);
      text(root, right - 2, y(opts.band) - 4, `±${opts.band.toFixed(3)}`, { "text-anchor": "end" });
    }
    if (opts.cutoff > 0) {
      svg("line", { class: "cutoff", x1: x(opts.cutoff + 0.5), x2: x(opts.cutoff + 0.5), y1: top, y2: bottom }, root);
      const nearRight = x(opts.cutoff + 0.5) > right - 70;
      text(root, x(opts.cutoff + 0.5) + (nearRight ? -3 : 3), top + 10, `cutoff P = ${opts.cutoff}`, { class: "chosen-label", "text-anchor": nearRight ? "end" : "start" });
    }
    return root;
  }

  /**
   * Information criteria by order, each shown as its difference from its own minimum on a log scale
   * (log10(1 + delta)), so the small differences near the chosen order stay visible beside the
   * large ones at low orders. The orders 0..P that the AIC chooses among are shaded.
   */
  function criteria(rows, chosenOrder, cutoff) {
    const W = 360, H = 230, left = 50, right = W - 12, top = 14, bottom = H - 38;
    const root = frame(W, H, "Information criteria by AR order");
    const minOf = key => Math.min(...rows.map(r => r[key]).filter(isFinite));
    const series = ["aic", "bic"].filter(key => rows.some(r => isFinite(r[key])))
      .map(key => ({ key, points: rows.filter(r => isFinite(r[key])).map(r => ({ order: r.order, d: r[key] - minOf(key) })) }));
    const [o0, o1] = extent(rows.map(r => r.order));
    const [, hi] = extent(series.flatMap(s => s.points.map(p => p.d)));
    const top10 = Math.max(1, Math.ceil(Math.log10(1 + Math.max(hi, 1))));
    const x = linear(o0 - 0.5, o1 + 0.5, left, right);
    const y = v => linear(0, top10, bottom, top)(Math.log10(1 + Math.max(0, v)));
    if (isFinite(cutoff) && cutoff >= o0) {
      const band = svg("rect", { class: "choice-range", x: x(o0 - 0.5), y: top, width: x(Math.min(cutoff, o1) + 0.5) - x(o0 - 0.5), height: bottom - top }, root);
      svg("title", {}, band).textContent = `orders 0..${cutoff}, among which the AIC chooses`;
      text(root, x(o0 - 0.5) + 3, bottom - 4, `0..P`, { class: "range-label" });
    }
    const tickValues = [0];
    for (let k = 1; k <= top10; k++) tickValues.push(Math.pow(10, k) - 1);
    yAxis(root, y, tickValues, left, right, "Δ from minimum", v => (v === 0 ? "0" : String(Math.round(v + 1))));
    const axis = svg("g", { class: "axis" }, root);
    for (const t of ticks(o0, o1, 8).filter(Number.isInteger)) text(axis, x(t), bottom + 15, String(t), { "text-anchor": "middle" });
    text(root, (left + right) / 2, bottom + 32, "AR order p", { class: "axis-title", "text-anchor": "middle" });
    for (const s of series) {
      const pts = s.points.map(p => ({ t: p.order, x: x(p.order), y: y(p.d) }));
      svg("path", { class: `criterion ${s.key}`, d: pathFrom(pts), "data-points": pts.length }, root);
      for (const p of pts) {
        if (s.key === "aic") svg("circle", { class: "marker aic", cx: p.x, cy: p.y, r: 2.6 }, root);
        else svg("rect", { class: "marker bic", x: p.x - 2.3, y: p.y - 2.3, width: 4.6, height: 4.6 }, root);
      }
    }
    const chosen = series.find(s => s.key === "aic")?.points.find(p => p.order === chosenOrder);
    if (chosen) {
      const cx = x(chosen.order), cy = y(chosen.d);
      svg("circle", { class: "chosen", cx, cy, r: 7 }, root);
      svg("line", { class: "chosen-pointer", x1: cx, x2: cx, y1: cy - 8, y2: top + 30 }, root);
      text(root, cx + 4, top + 26, `chosen p = ${chosenOrder}`, { class: "chosen-label", "text-anchor": cx > right - 80 ? "end" : "start" });
    }
    return root;
  }

  /** Several lines over a shared numeric x axis; series: [{label, cls, points: [{x, y}]}]. */
  function lines(series, opts) {
    const W = 360, H = 230, left = 46, right = W - 12, top = 14, bottom = H - 38;
    const root = frame(W, H, opts.title);
    const all = series.flatMap(s => s.points);
    const [x0, x1] = extent(all.map(p => p.x));
    let [, hi] = extent(all.map(p => p.y));
    hi = (isFinite(hi) ? hi : 1) * 1.08;
    const x = linear(x0, x1, left, right);
    const y = linear(0, hi, bottom, top);
    yAxis(root, y, ticks(0, hi, 5), left, right, opts.yLabel, v => v.toFixed(hi < 3 ? 1 : 0));
    const axis = svg("g", { class: "axis" }, root);
    svg("line", { x1: left, x2: right, y1: bottom, y2: bottom }, axis);
    for (const t of ticks(x0, x1, 6).filter(Number.isInteger)) text(axis, x(t), bottom + 15, String(t), { "text-anchor": "middle" });
    text(root, (left + right) / 2, bottom + 32, opts.xLabel, { class: "axis-title", "text-anchor": "middle" });
    for (const s of series) {
      const pts = s.points.filter(p => isFinite(p.y)).map(p => ({ t: p.x, x: x(p.x), y: y(p.y) }));
      const line = svg("path", { class: `series ${s.cls}`, d: pathFrom(pts), "data-points": pts.length }, root);
      svg("title", {}, line).textContent = s.label;
    }
    return root;
  }

  return { forecast, correlogram, criteria, lines };
})();
