/* lobeplan plan page. Reads the embedded plan.json and drawing data; prints
   only numbers that plan.json holds (formatted, never recomputed). */
(function () {
  "use strict";
  var T0 = performance.now();
  var PLAN = JSON.parse(document.getElementById("plan-json").textContent);
  var DRAW = JSON.parse(document.getElementById("page-drawing").textContent);
  var SVGNS = "http://www.w3.org/2000/svg";
  var MONTHS = ["January", "February", "March", "April", "May", "June", "July", "August", "September",
                "October", "November", "December"];
  var C = DRAW.colours;
  var R = DRAW.rim_km;

  function $(id) { return document.getElementById(id); }
  function el(tag, attrs, text) {
    var e = document.createElement(tag);
    for (var k in (attrs || {})) { e.setAttribute(k, attrs[k]); }
    if (text !== undefined && text !== null) { e.textContent = String(text); }
    return e;
  }
  function sv(tag, attrs, text) {
    var e = document.createElementNS(SVGNS, tag);
    for (var k in (attrs || {})) { e.setAttribute(k, attrs[k]); }
    if (text !== undefined && text !== null) { e.textContent = String(text); }
    return e;
  }
  function clear(node) { while (node.firstChild) { node.removeChild(node.firstChild); } return node; }
  function isNum(x) { return typeof x === "number" && isFinite(x); }
  // numbers are printed with the decimals plan.json keeps, so the text is the file's value
  function db(x, nd) { return isNum(x) ? (x > 0 ? "+" : x < 0 ? "\u2212" : "") + Math.abs(x).toFixed(nd === undefined ? 2 : nd) + " dB" : "\u2014"; }
  function num(x, nd) { return isNum(x) ? (x < 0 ? "\u2212" : "") + Math.abs(x).toFixed(nd) : "\u2014"; }
  function deg(x) { return isNum(x) ? x.toFixed(1) + "\u00b0" : "\u2014"; }
  function km(x) { return isNum(x) ? x.toFixed(1) + " km" : "\u2014"; }
  function share(x) { return isNum(x) ? (x * 100).toFixed(1) + " %" : "\u2014"; }
  function hh(h) { return (h < 10 ? "0" : "") + h; }
  function monthName(m) { return MONTHS[m - 1] || String(m); }
  function uniq(xs) { var seen = {}, out = []; xs.forEach(function (x) { var k = JSON.stringify(x); if (!seen[k]) { seen[k] = 1; out.push(x); } }); return out; }

  var comparison = PLAN.spacing_comparison || [];
  var schedule = Array.isArray(PLAN.schedule) ? PLAN.schedule : [];
  var stakes = Array.isArray(PLAN.stakes) ? PLAN.stakes : [];
  var goalPaths = Array.isArray(PLAN.goal_paths) ? PLAN.goal_paths : [];
  var months = uniq((Array.isArray(PLAN.months) ? PLAN.months : []).concat(schedule.map(function (r) { return r.month; })))
    .filter(isNum).sort(function (a, b) { return a - b; });
  if (!schedule.length) { months = []; }
  var hours = uniq(schedule.map(function (r) { return r.hour_utc; })).filter(isNum).sort(function (a, b) { return a - b; });
  var rowIndex = {};
  var scheduled = {};
  schedule.forEach(function (r) { rowIndex[[r.option, r.band, r.month, r.hour_utc].join("\u0000")] = r; scheduled[r.option] = true; });

  /* A goal of a schedule row: {name, path}. The schedule names a long path
     "NAME (long path)" and may carry no path key. */
  var goalNames = {};
  DRAW.goals.forEach(function (g) { goalNames[g.name] = true; });
  var LONG = " (long path)";
  function slotGoal(g) {
    if (g.path) { return { name: g.name, path: g.path }; }
    var n = String(g.name);
    if (!goalNames[n] && n.slice(-LONG.length) === LONG && goalNames[n.slice(0, -LONG.length)]) {
      return { name: n.slice(0, -LONG.length), path: "long" };
    }
    return { name: n, path: "short" };
  }
  function drawOption(name) {
    for (var i = 0; i < DRAW.options.length; i++) { if (DRAW.options[i].option === name) { return DRAW.options[i]; } }
    return DRAW.options[0];
  }
  function compOption(name) {
    for (var i = 0; i < comparison.length; i++) { if (comparison[i].option === name) { return comparison[i]; } }
    return null;
  }
  function stateColour(opt, state) {
    var i = drawOption(opt).states.indexOf(state);
    return i < 0 ? C.closed : C.states[i % C.states.length];
  }
  function advantageColour(a) {
    var rng = C.advantage_range_db, t = (Math.max(-rng, Math.min(rng, a)) + rng) / (2 * rng), s = C.goal_stops;
    for (var i = 1; i < s.length; i++) {
      if (t <= s[i][0] || i === s.length - 1) {
        var f = (t - s[i - 1][0]) / ((s[i][0] - s[i - 1][0]) || 1);
        f = Math.max(0, Math.min(1, f));
        var a0 = parseInt(s[i - 1][1].slice(1), 16), a1 = parseInt(s[i][1].slice(1), 16), out = "#";
        for (var sh = 16; sh >= 0; sh -= 8) {
          var v = Math.round(((a0 >> sh) & 255) * (1 - f) + ((a1 >> sh) & 255) * f);
          out += (v < 16 ? "0" : "") + v.toString(16);
        }
        return out;
      }
    }
    return C.closed;
  }

  var ui = { option: null, band: null, state: "best", month: months.length ? months[0] : null,
             hour: hours.length ? hours[0] : 0, goal: null };
  if (PLAN.ranking && PLAN.ranking.length) { ui.option = PLAN.ranking[0].option; }
  else if (comparison.length) { ui.option = comparison[0].option; }
  else { ui.option = DRAW.options.length ? DRAW.options[0].option : null; }
  ui.band = DRAW.bands[0];

  function scheduleRow() {
    if (!schedule.length) { return null; }
    return rowIndex[[ui.option, ui.band, ui.month, ui.hour].join("\u0000")] || null;
  }

  /* What the map shows for the selection: per goal name, the rows of plan.json
     that rate it, and the states whose lobes are drawn. */
  function selection() {
    var out = { goals: {}, lobes: [], hourly: false, row: null, why: "" };
    var comp = compOption(ui.option);
    if (scheduled[ui.option]) {
      var row = scheduleRow();
      out.hourly = true;
      out.row = row;
      if (!row) {
        out.why = "The schedule has no row for this option, band, month and hour.";
        return out;
      }
      var live = ui.state === "best" ? row.state : ui.state;
      if (live) { out.lobes = [live]; }
      (row.goals || []).forEach(function (g) {
        var rated = ui.state === "best" || ui.state === row.state, id = slotGoal(g);
        var rec = out.goals[id.name] || (out.goals[id.name] = []);
        rec.push({ path: id.path, state: row.state, advantage_db: g.advantage_db, open_share: g.open_share, rated: rated });
      });
      // goals of the band that the row leaves out are not open in this slot
      (comp ? comp.goals : []).forEach(function (g) {
        if (g.band !== ui.band) { return; }
        var rec = out.goals[g.goal] || (out.goals[g.goal] = []);
        if (!rec.some(function (r) { return !r.path || r.path === g.path; })) {
          rec.push({ path: g.path, state: null, advantage_db: null, open_share: null, rated: true, closed: true });
        }
      });
      if (!row.state) { out.why = "No state serves an open goal at this hour: the band is closed to them."; }
      else if (ui.state !== "best" && ui.state !== row.state) {
        out.why = "The schedule rates only the state it picks at this hour (" + row.state + "); goals are shown unrated for " + ui.state + ".";
      }
      return out;
    }
    if (schedule.length) { out.why = "The schedule holds no rows for " + ui.option + ": it is shown over all the planned hours."; }
    var rows = comp ? comp.goals.filter(function (g) { return g.band === ui.band; }) : [];
    rows.forEach(function (g) {
      var rated = ui.state === "best" || ui.state === g.state;
      var rec = out.goals[g.goal] || (out.goals[g.goal] = []);
      rec.push({ path: g.path, state: g.state, advantage_db: g.advantage_db, open_share: g.open_fraction, rated: rated });
    });
    if (ui.state === "best") {
      out.lobes = uniq(rows.map(function (g) { return g.state; }).filter(Boolean));
      if (!out.lobes.length) { out.lobes = [drawOption(ui.option).states[0]]; }
    } else {
      out.lobes = [ui.state];
      if (rows.some(function (g) { return g.state && g.state !== ui.state; })) {
        out.why = (out.why ? out.why + " " : "") + "plan.json rates each goal in its own best state; goals served by another state are shown unrated.";
      }
    }
    return out;
  }

  /* ---------- the map ---------- */
  var svg = $("map");
  var V = R * 1.16;
  svg.setAttribute("viewBox", [-V, -V, 2 * V, 2 * V].join(" "));
  function xy(bearingDeg, distKm) {
    var b = bearingDeg * Math.PI / 180;
    return [distKm * Math.sin(b), -distKm * Math.cos(b)];
  }
  var layers = {};
  function layer(id, label) {
    var g = sv("g", { id: "layer-" + id });
    svg.appendChild(g);
    layers[id] = g;
    if (label) {
      var box = el("input", { type: "checkbox", id: "show-" + id });
      box.checked = true;
      box.addEventListener("change", function () { g.style.display = box.checked ? "" : "none"; });
      var lab = el("label", { "for": "show-" + id });
      lab.appendChild(box);
      lab.appendChild(document.createTextNode(label));
      $("layers").appendChild(lab);
    }
    return g;
  }
  var defs = sv("defs");
  svg.appendChild(defs);
  var clip = sv("clipPath", { id: "disc" });
  clip.appendChild(sv("circle", { cx: 0, cy: 0, r: R }));
  defs.appendChild(clip);
  function hatch(id, colour, d) {
    var p = sv("pattern", { id: id, patternUnits: "userSpaceOnUse", width: 500, height: 500 });
    p.appendChild(sv("path", { d: d, stroke: colour, "stroke-width": 70, fill: "none" }));
    defs.appendChild(p);
  }
  hatch("hatch-avoid", C.avoid, "M0 500L500 0M-100 100L100 -100M400 600L600 400");
  hatch("hatch-unrated", "#6d6a60", "M0 0L500 500M-100 400L100 600M400 -100L600 100");
  var dots = sv("pattern", { id: "dots-closed", patternUnits: "userSpaceOnUse", width: 420, height: 420 });
  dots.appendChild(sv("rect", { width: 420, height: 420, fill: C.closed }));
  dots.appendChild(sv("circle", { cx: 210, cy: 210, r: 60, fill: "#ffffff" }));
  defs.appendChild(dots);

  svg.appendChild(sv("circle", { cx: 0, cy: 0, r: R, fill: C.sea }));
  var land = layer("land", "land");
  land.setAttribute("clip-path", "url(#disc)");
  DRAW.land.forEach(function (d) { land.appendChild(sv("path", { d: d, fill: C.land, "fill-rule": "evenodd" })); });
  DRAW.borders.forEach(function (d) {
    land.appendChild(sv("path", { d: d, fill: "none", stroke: C.land_edge, "stroke-width": 0.6, "vector-effect": "non-scaling-stroke" }));
  });
  var goalLayer = layer("goals", "goals");
  goalLayer.setAttribute("clip-path", "url(#disc)");
  var goalNodes = {};
  DRAW.goals.forEach(function (g) {
    var a = sv("g", { "class": "goal", tabindex: "0", role: "button", "data-goal": g.name });
    a.appendChild(sv("path", { "class": "fill", d: g.fill, "fill-rule": "evenodd", "fill-opacity": 0.82 }));
    a.appendChild(sv("path", { "class": "edge", d: g.edge || g.fill, fill: "none", stroke: C.ink, "stroke-width": 0.9, "vector-effect": "non-scaling-stroke" }));
    if (g.label_km && g.size_km < 600) {  // too small to point at: a ring around it
      a.appendChild(sv("circle", { "class": "fill", cx: g.label_km[0], cy: g.label_km[1], r: 420, "fill-opacity": 0.82 }));
      a.appendChild(sv("circle", { "class": "edge", cx: g.label_km[0], cy: g.label_km[1], r: 420, fill: "none", stroke: C.ink, "stroke-width": 1.2, "vector-effect": "non-scaling-stroke" }));
    }
    a.appendChild(sv("title", {}, g.name));
    function show() { ui.goal = g.name; markGoal(); renderInfo(); }
    a.addEventListener("mouseenter", show);
    a.addEventListener("focus", show);
    a.addEventListener("click", show);
    a.addEventListener("keydown", function (ev) { if (ev.key === "Enter" || ev.key === " ") { ev.preventDefault(); show(); } });
    goalLayer.appendChild(a);
    goalNodes[g.name] = a;
  });
  var avoidLayer = layer("avoid", DRAW.avoid.length ? "avoid regions" : null);
  avoidLayer.setAttribute("clip-path", "url(#disc)");
  DRAW.avoid.forEach(function (a) {
    var p = sv("path", { d: a.fill, fill: "url(#hatch-avoid)", stroke: C.avoid, "stroke-width": 0.9, "vector-effect": "non-scaling-stroke", "data-avoid": a.region });
    p.appendChild(sv("title", {}, "keep in the rear: " + a.region + " (for " + a.for.join(", ") + ")"));
    avoidLayer.appendChild(p);
  });

  var rings = layer("rings", "range rings");
  var step = DRAW.ring_step_km, ringKm = [];
  for (var k = 1; k * step < R - 0.25 * step; k++) {
    ringKm.push(k * step);
    rings.appendChild(sv("circle", { cx: 0, cy: 0, r: k * step, fill: "none", stroke: C.ring, "stroke-width": 0.7, "stroke-dasharray": "3 3", "vector-effect": "non-scaling-stroke", "data-ring-km": k * step }));
  }
  var ringLabels = sv("g");
  rings.appendChild(ringLabels);
  // ring labels go down a bearing clear of the baseline and of the goals' names
  function placeRingLabels(thetaDeg) {
    clear(ringLabels);
    var busy = isNum(thetaDeg) ? [thetaDeg, thetaDeg + 180] : [];
    DRAW.goals.forEach(function (g) { if (g.label_km) { busy.push(Math.atan2(g.label_km[0], -g.label_km[1]) * 180 / Math.PI); } });
    var best = 200, room = -1;
    [200, 160, 340, 20, 225, 135, 315, 45].forEach(function (c) {
      var near = Math.min.apply(null, busy.map(function (b) { return Math.abs(((c - b) % 360 + 540) % 360 - 180); }).concat([180]));
      if (near > room + 1e-9) { room = near; best = c; }
    });
    ringKm.forEach(function (d) {
      var p = xy(best, d);
      ringLabels.appendChild(sv("text", { x: p[0], y: p[1], "font-size": 620, fill: "#3c474f", "text-anchor": "middle", "dominant-baseline": "middle", stroke: "#fff", "stroke-width": 180, "paint-order": "stroke" }, d.toLocaleString("en-US").replace(/,/g, "\u2009") + " km"));
    });
  }
  var bearings = layer("bearings", "bearings");
  for (var b = 0; b < 360; b += 10) {
    var major = b % 30 === 0;
    var p0 = xy(b, major ? 0 : R), p1 = xy(b, R * (major ? 1.035 : 1.018));
    bearings.appendChild(sv("line", { x1: p0[0], y1: p0[1], x2: p1[0], y2: p1[1], stroke: major ? C.ring : C.ink, "stroke-opacity": major ? 0.45 : 1, "stroke-width": major ? 0.6 : 0.8, "vector-effect": "non-scaling-stroke" }));
    if (major) {
      var lp = xy(b, R * 1.08);
      bearings.appendChild(sv("text", { x: lp[0], y: lp[1], "font-size": 1150, fill: C.ink, "text-anchor": "middle", "dominant-baseline": "middle" }, b + "\u00b0"));
    }
  }
  svg.appendChild(sv("circle", { cx: 0, cy: 0, r: R, fill: "none", stroke: C.ink, "stroke-width": 1.3, "vector-effect": "non-scaling-stroke" }));
  var names = layer("names", "goal names");
  DRAW.goals.forEach(function (g) {
    if (!g.label_km) { return; }
    names.appendChild(sv("text", { x: g.label_km[0], y: g.label_km[1], "font-size": 780, "font-weight": 600, fill: C.ink, "text-anchor": "middle", "dominant-baseline": "middle", stroke: "#fff", "stroke-width": 200, "stroke-opacity": 0.85, "paint-order": "stroke", "pointer-events": "none" }, g.name));
  });
  var baseline = layer("baseline", "baseline");
  var lobes = layer("lobes", "lobes");
  svg.appendChild(sv("circle", { cx: 0, cy: 0, r: 180, fill: "#fff", stroke: C.ink, "stroke-width": 1.3, "vector-effect": "non-scaling-stroke" }));

  function markGoal() {
    Object.keys(goalNodes).forEach(function (n) { goalNodes[n].classList.toggle("hot", n === ui.goal); });
  }

  function renderMap(sel) {
    var comp = compOption(ui.option);
    Object.keys(goalNodes).forEach(function (name) {
      var node = goalNodes[name], fills = node.querySelectorAll(".fill"), recs = sel.goals[name];
      var fill = { setAttribute: function (k, v) { fills.forEach(function (f) { f.setAttribute(k, v); }); } };
      var rated = (recs || []).filter(function (r) { return r.rated && isNum(r.advantage_db); });
      var label;
      if (!recs) {
        fill.setAttribute("fill", "none");
        node.setAttribute("data-shade", "off-band");
        label = name + ": not a goal on " + ui.band;
      } else if (rated.length) {
        var best = Math.max.apply(null, rated.map(function (r) { return r.advantage_db; }));
        fill.setAttribute("fill", advantageColour(best));
        node.setAttribute("data-shade", String(best));
        label = name + ": " + db(best);
      } else if (recs.some(function (r) { return !r.rated; })) {
        fill.setAttribute("fill", "url(#hatch-unrated)");
        node.setAttribute("data-shade", "unrated");
        label = name + ": not rated for this state";
      } else {
        fill.setAttribute("fill", "url(#dots-closed)");
        node.setAttribute("data-shade", "closed");
        label = name + ": closed";
      }
      node.setAttribute("aria-label", label);
    });

    clear(baseline);
    var theta = comp ? comp.best_orientation_deg : null;
    placeRingLabels(theta);
    if (isNum(theta)) {
      var a = xy(theta + 180, R), z = xy(theta, R), s0 = xy(theta + 180, 1100), s1 = xy(theta, 1100);
      baseline.appendChild(sv("line", { x1: a[0], y1: a[1], x2: z[0], y2: z[1], stroke: C.ink, "stroke-width": 0.8, "stroke-dasharray": "7 4", "vector-effect": "non-scaling-stroke" }));
      baseline.appendChild(sv("line", { id: "baseline", x1: s0[0], y1: s0[1], x2: s1[0], y2: s1[1], stroke: C.ink, "stroke-width": 3.2, "vector-effect": "non-scaling-stroke", "data-bearing-deg": theta }));
      var tip = xy(theta, 1500), l = xy(theta - 25, 1000), r = xy(theta + 25, 1000);
      baseline.appendChild(sv("path", { d: "M" + tip.join(" ") + "L" + l.join(" ") + "L" + r.join(" ") + "z", fill: C.ink }));
    }

    clear(lobes);
    var dop = drawOption(ui.option), radii = (dop.lobes_km || {})[ui.band] || {};
    sel.lobes.forEach(function (state) {
      var rr = radii[state];
      if (!rr) { return; }
      var pts = rr.map(function (rad, i) { return xy(i, rad).map(function (v) { return Math.round(v); }).join(" "); });
      var col = stateColour(ui.option, state);
      var poly = sv("polygon", { points: pts.join(" "), fill: col, "fill-opacity": 0.14, stroke: col, "stroke-width": 2, "vector-effect": "non-scaling-stroke", "data-state": state });
      poly.appendChild(sv("title", {}, "lobe: " + state));
      lobes.appendChild(poly);
    });

    var line = ui.option + " on " + ui.band;
    if (comp && isNum(comp.best_orientation_deg)) { line += ", baseline along " + deg(comp.best_orientation_deg) + " (its best), score " + db(comp.score_db); }
    else { line += ": no allowed bearing serves an open goal"; }
    if (sel.hourly) { line += "; " + monthName(ui.month) + " " + hh(ui.hour) + " UTC"; }
    if (sel.row && isNum(sel.row.score_db)) { line += ", score this hour " + db(sel.row.score_db); }
    if (sel.row && sel.row.runner_up_state) {
      line += " (runner-up " + sel.row.runner_up_state + (isNum(sel.row.runner_up_loss_db) ? ", loses " + num(sel.row.runner_up_loss_db, 2) + " dB" : "") + ")";
    }
    line += "; lobes: " + (sel.lobes.length ? sel.lobes.join(", ") : "none (closed)");
    $("map-line").textContent = line;
    $("control-note").textContent = sel.why;
  }

  /* ---------- goal details ---------- */
  function renderInfo() {
    var box = clear($("goal-info"));
    box.appendChild(el("h2", { id: "goal-info-title" }, ui.goal || "Goal"));
    if (!ui.goal) {
      box.appendChild(el("p", { "class": "sub" }, "Point at a goal on the map, or move to it with the Tab key."));
      return;
    }
    var sel = selection(), recs = sel.goals[ui.goal] || [];
    goalPaths.filter(function (p) { return p.name === ui.goal; }).forEach(function (p) {
      var dl = el("dl", { "class": "kv", "data-path": p.path });
      function kv(k, v, attrs) { dl.appendChild(el("dt", {}, k)); dl.appendChild(el("dd", attrs || {}, v)); }
      kv("path", p.path + " path");
      kv("bearings", deg(p.bearing_deg.start) + " to " + deg(p.bearing_deg.end) + " (median " + deg(p.bearing_deg.median) + ")", { "data-figure": "bearing" });
      kv("distance", km(p.distance_km.min) + " to " + km(p.distance_km.max) + " (median " + km(p.distance_km.median) + ")", { "data-figure": "distance" });
      recs.filter(function (r) { return !r.path || r.path === p.path; }).forEach(function (r) {
        var when = sel.hourly ? " at " + hh(ui.hour) + " UTC" : " (planned hours)";
        if (r.closed) { kv(hh(ui.hour) + " UTC", "not open in this slot (the schedule lists it nowhere here)"); return; }
        kv("open share" + when, share(r.open_share), { "data-figure": "open-share" });
        kv("advantage" + when, r.rated ? db(r.advantage_db) : "not rated for " + ui.state, { "data-figure": "advantage" });
        kv("state", r.state || "closed");
      });
      if (!recs.length) { kv("on " + ui.band, "not a goal on this band"); }
      box.appendChild(dl);
    });
    if (!goalPaths.some(function (p) { return p.name === ui.goal; })) {
      box.appendChild(el("p", { "class": "sub" }, "plan.json holds no bearings for this goal."));
    }
  }

  /* ---------- key ---------- */
  function renderLegend(sel) {
    var box = clear($("legend-body"));
    var rng = C.advantage_range_db;
    var bar = sv("svg", { viewBox: "0 0 240 34", width: "100%", role: "img", "aria-label": "goal colours: advantage over one vertical from " + (-rng) + " to +" + rng + " dB" });
    var grad = sv("linearGradient", { id: "adv-grad" });
    C.goal_stops.forEach(function (s) { grad.appendChild(sv("stop", { offset: s[0], "stop-color": s[1] })); });
    var gd = sv("defs"); gd.appendChild(grad); bar.appendChild(gd);
    bar.appendChild(sv("rect", { x: 10, y: 2, width: 220, height: 12, fill: "url(#adv-grad)", stroke: "#0006", "stroke-width": 0.5 }));
    for (var v = -rng; v <= rng; v += 2) {
      var x = 10 + (v + rng) / (2 * rng) * 220;
      bar.appendChild(sv("line", { x1: x, y1: 14, x2: x, y2: 18, stroke: C.ink }));
      bar.appendChild(sv("text", { x: x, y: 29, "font-size": 9, "text-anchor": "middle", fill: C.ink }, (v > 0 ? "+" : "") + v));
    }
    box.appendChild(el("p", { "class": "legend-row" }, "Goals: advantage over one vertical, dB"));
    box.appendChild(bar);
    [["url(#dots-closed)", C.closed, "closed (band does not reach it)"], [null, "#6d6a60", "not rated for the chosen state"], [null, "transparent", "outline only: not a goal on this band"]].forEach(function (e) {
      var row = el("p", { "class": "legend-row" });
      row.appendChild(el("span", { "class": "swatch", style: "background:" + e[1] }));
      row.appendChild(document.createTextNode(e[2]));
      box.appendChild(row);
    });
    box.appendChild(el("p", { "class": "legend-row" }, "Switch states (lobes and schedule)"));
    drawOption(ui.option).states.forEach(function (s) {
      var row = el("p", { "class": "legend-row" });
      row.appendChild(el("span", { "class": "swatch", style: "background:" + stateColour(ui.option, s) }));
      row.appendChild(document.createTextNode(s + (sel.lobes.indexOf(s) >= 0 ? " (drawn)" : "")));
      box.appendChild(row);
    });
    if (DRAW.avoid.length) {
      var row = el("p", { "class": "legend-row" });
      row.appendChild(el("span", { "class": "swatch", style: "background:" + C.avoid }));
      row.appendChild(document.createTextNode("keep in the rear (avoid)"));
      box.appendChild(row);
    }
  }

  /* ---------- schedule figure and switch card ---------- */
  function renderSchedule() {
    var fig = clear($("schedule-fig")), card = clear($("switch-card"));
    if (!schedule.length) {
      fig.appendChild(el("p", { "class": "sub" }, "This plan has no hour-by-hour schedule (plan.json has no \u201cschedule\u201d): the map and table show the plan over all its hours, and the month and hour controls are off."));
      card.appendChild(el("p", { "class": "sub" }, "No switch card without a schedule."));
      return;
    }
    if (!scheduled[ui.option]) {
      fig.appendChild(el("p", { "class": "sub" }, "The schedule holds no rows for " + ui.option + "."));
      $("card-title").textContent = "Switch card";
      card.appendChild(el("p", { "class": "sub" }, "No switch card for this option."));
      return;
    }
    var opt = ui.option, bands = DRAW.bands, ms = months.length ? months : [null];
    var hs = hours.length ? hours : [0];
    var cw = 18, ch = 14, left = 78, top = 16, gap = 14;
    var height = top + bands.length * (ms.length * ch + gap + 12) + 8;
    var width = left + hs.length * cw + 8;
    var s = sv("svg", { viewBox: "0 0 " + width + " " + height, width: Math.round(width * 1.45), style: "height:auto;display:block", role: "img", id: "schedule-svg",
                        "aria-label": "schedule of " + opt + ": the state the schedule picks for each band, month and hour; the switch card below says the same in words" });
    hs.forEach(function (h, j) {
      if (j % 3 === 0) { s.appendChild(sv("text", { x: left + j * cw + cw / 2, y: 11, "font-size": 9, "text-anchor": "middle", fill: C.ink }, hh(h))); }
    });
    var y = top;
    bands.forEach(function (band) {
      s.appendChild(sv("text", { x: 2, y: y + 9, "font-size": 10, "font-weight": 700, fill: C.ink }, band));
      y += 12;
      ms.forEach(function (m) {
        s.appendChild(sv("text", { x: left - 4, y: y + ch - 3, "font-size": 9, "text-anchor": "end", fill: C.ink }, m === null ? "" : monthName(m).slice(0, 3)));
        hs.forEach(function (h, j) {
          var r = rowIndex[[opt, band, m, h].join("\u0000")];
          var fill = !r ? "#ffffff" : r.state ? stateColour(opt, r.state) : C.closed;
          var cell = sv("rect", { x: left + j * cw, y: y, width: cw - 1, height: ch - 1, fill: fill, "data-band": band, "data-month": m, "data-hour": h });
          cell.appendChild(sv("title", {}, band + ", " + monthName(m) + ", " + hh(h) + " UTC: " + (!r ? "no row" : r.state || "closed")));
          cell.addEventListener("click", function () { setUi({ band: band, month: m, hour: h }); });
          s.appendChild(cell);
          if (band === ui.band && m === ui.month && h === ui.hour) {
            s.appendChild(sv("rect", { x: left + j * cw - 1.5, y: y - 1.5, width: cw + 2, height: ch + 2, fill: "none", stroke: C.ink, "stroke-width": 2, id: "schedule-here" }));
          }
        });
        y += ch;
      });
      y += gap;
    });
    fig.appendChild(s);
    var key = el("p", { "class": "sub" });
    drawOption(opt).states.forEach(function (st) {
      key.appendChild(el("span", { "class": "swatch", style: "background:" + stateColour(opt, st) }));
      key.appendChild(document.createTextNode(st + "\u2003"));
    });
    key.appendChild(el("span", { "class": "swatch", style: "background:" + C.closed }));
    key.appendChild(document.createTextNode("closed"));
    fig.appendChild(key);
    if (months.length === 1) { fig.appendChild(el("p", { "class": "sub" }, "A single-month plan: " + monthName(months[0]) + " only.")); }

    // the switch card: for the chosen month, runs of hours with one state, per band
    $("card-title").textContent = "Switch card: " + opt + (ui.month !== null ? ", " + monthName(ui.month) : "");
    var t = el("table", { id: "card-table" }), head = el("tr");
    ["band", "hours (UTC)", "state", "goals open"].forEach(function (h) { head.appendChild(el("th", { scope: "col" }, h)); });
    t.appendChild(el("thead")).appendChild(head);
    var body = el("tbody");
    bands.forEach(function (band) {
      var run = null, runs = [];
      hs.forEach(function (h) {
        var r = rowIndex[[opt, band, ui.month, h].join("\u0000")];
        var st = r ? (r.state || null) : undefined;
        var open = r ? (r.goals || []).filter(function (g) { return isNum(g.open_share) && g.open_share > 0; }).map(function (g) { return g.name; }) : [];
        open = uniq(open);
        if (run && run.state === st && run.end === h) { run.end = h + 1; run.open = uniq(run.open.concat(open)); }
        else { run = { state: st, start: h, end: h + 1, open: open }; runs.push(run); }
      });
      runs.forEach(function (rn, i) {
        if (rn.state === undefined) { return; }
        var tr = el("tr", { "class": band === ui.band && ui.hour >= rn.start && ui.hour < rn.end ? "here" : "" });
        tr.appendChild(el("td", {}, i === 0 || runs[i - 1].state === undefined ? band : ""));
        tr.appendChild(el("td", { "class": "num" }, hh(rn.start) + "\u2013" + hh(rn.end % 24 === 0 && rn.end ? 24 : rn.end)));
        var td = el("td");
        if (rn.state) { td.appendChild(el("span", { "class": "swatch", style: "background:" + stateColour(opt, rn.state) })); }
        td.appendChild(document.createTextNode(rn.state || "closed"));
        tr.appendChild(td);
        tr.appendChild(el("td", {}, rn.open.join(", ") || "\u2014"));
        body.appendChild(tr);
      });
    });
    t.appendChild(body);
    card.appendChild(t);
  }

  /* ---------- per-goal table ---------- */
  function renderTable(sel) {
    var t = clear($("goal-table")), comp = compOption(ui.option);
    var cols = [["goal", ""], ["path", ""], ["band", ""], ["state", ""], ["mean", "dBi"], ["p10", "dBi"], ["vs one vertical", "dB"], ["open share", ""]];
    if (sel.hourly) { cols.push(["at " + hh(ui.hour) + " UTC", "open / adv."]); }
    var head = el("tr");
    cols.forEach(function (c, i) { head.appendChild(el("th", { scope: "col", "class": i >= 4 ? "num" : "" }, c[0] + (c[1] ? " (" + c[1] + ")" : ""))); });
    t.appendChild(el("thead")).appendChild(head);
    var body = el("tbody");
    (comp ? comp.goals : []).forEach(function (g, i) {
      var tr = el("tr", { "class": g.band === ui.band ? "here" : "", "data-row": i });
      tr.appendChild(el("td", {}, g.goal));
      tr.appendChild(el("td", {}, g.path));
      tr.appendChild(el("td", {}, g.band));
      tr.appendChild(el("td", {}, g.state || "closed"));
      tr.appendChild(el("td", { "class": "num", "data-key": "mean_gain_dbi" }, num(g.mean_gain_dbi, 2)));
      tr.appendChild(el("td", { "class": "num", "data-key": "p10_gain_dbi" }, num(g.p10_gain_dbi, 2)));
      tr.appendChild(el("td", { "class": "num", "data-key": "advantage_db" }, db(g.advantage_db).replace(" dB", "")));
      tr.appendChild(el("td", { "class": "num", "data-key": "open_fraction" }, share(g.open_fraction)));
      if (sel.hourly) {
        var txt = "";
        if (g.band === ui.band && sel.row) {
          (sel.row.goals || []).forEach(function (h) {
            var id = slotGoal(h);
            if (id.name === g.goal && id.path === g.path) { txt = share(h.open_share) + " / " + db(h.advantage_db); }
          });
        }
        tr.appendChild(el("td", { "class": "num" }, txt || "\u2014"));
      }
      body.appendChild(tr);
    });
    t.appendChild(body);
    $("goal-table-note").textContent = comp && isNum(comp.best_orientation_deg)
      ? ui.option + " with the baseline along " + deg(comp.best_orientation_deg) + ". Rows of " + ui.band + " are marked. State: the switch position best for the goal; vs one vertical: the advantage; open share: over the planned hours."
      : "This option has no bearing that serves an open goal.";
  }

  /* ---------- staking plan ---------- */
  function cell(v) {
    if (v === null || v === undefined) { return "\u2014"; }
    if (Array.isArray(v)) { return v.map(cell).join(", "); }
    if (typeof v === "object") { return Object.keys(v).map(function (k) { return k + ": " + cell(v[k]); }).join("; "); }
    return String(v);
  }
  var UNITS = { m: "m", deg: "\u00b0", db: "dB", dbi: "dBi", ohm: "\u03a9", km: "km", mhz: "MHz" };
  function heading(key) {
    var m = /^(.*)_(m|deg|db|dbi|ohm|km|mhz)$/.exec(key);
    return m ? m[1].replace(/_/g, " ") + " (" + UNITS[m[2]] + ")" : key.replace(/_/g, " ");
  }
  // a ground plan of the stakes: north up, element numbers only (the figures are in the table)
  function groundPlan(entry) {
    var pts = (entry.elements || []).filter(function (e) { return isNum(e.north_m) && isNum(e.east_m); });
    if (!pts.length) { return null; }
    var j = entry.junction && isNum(entry.junction.north_m) && isNum(entry.junction.east_m) ? entry.junction : null;
    var all = pts.concat(j ? [j] : []);
    var n0 = Math.min.apply(null, all.map(function (e) { return e.north_m; })), n1 = Math.max.apply(null, all.map(function (e) { return e.north_m; }));
    var e0 = Math.min.apply(null, all.map(function (e) { return e.east_m; })), e1 = Math.max.apply(null, all.map(function (e) { return e.east_m; }));
    var span = Math.max(n1 - n0, e1 - e0, 1), size = 220, pad = 30, k = (size - 2 * pad) / span;
    var cx = (e0 + e1) / 2, cy = (n0 + n1) / 2;
    function at(e) { return [size / 2 + (e.east_m - cx) * k, size / 2 - (e.north_m - cy) * k]; }
    var s = sv("svg", { viewBox: "0 0 " + size + " " + size, width: size, id: "stakes-plan", role: "img", "aria-label": "ground plan of the stakes, north up" });
    s.appendChild(sv("rect", { x: 0.5, y: 0.5, width: size - 1, height: size - 1, fill: "#fff", stroke: "#d9d2bf" }));
    s.appendChild(sv("path", { d: "M18 34L18 12M12 20L18 12L24 20", stroke: C.ink, fill: "none", "stroke-width": 1.4 }));
    s.appendChild(sv("text", { x: 18, y: 46, "font-size": 11, "text-anchor": "middle", fill: C.ink }, "N"));
    if (j) {
      var q = at(j);
      pts.forEach(function (e) { var p = at(e); s.appendChild(sv("line", { x1: q[0], y1: q[1], x2: p[0], y2: p[1], stroke: C.ring, "stroke-dasharray": "3 2" })); });
      s.appendChild(sv("rect", { x: q[0] - 5, y: q[1] - 5, width: 10, height: 10, fill: C.land, stroke: C.ink }));
    }
    pts.forEach(function (e) {
      var p = at(e);
      s.appendChild(sv("circle", { cx: p[0], cy: p[1], r: 6, fill: C.states[0], stroke: "#fff", "stroke-width": 1.5 }));
      s.appendChild(sv("text", { x: p[0] + 9, y: p[1] - 8, "font-size": 12, "font-weight": 700, fill: C.ink }, e.element));
    });
    return s;
  }
  function objectTable(rows, id) {
    var keys = uniq([].concat.apply([], rows.map(function (r) { return r && typeof r === "object" ? Object.keys(r) : []; })));
    var t = el("table", id ? { id: id } : {}), head = el("tr");
    keys.forEach(function (k) { head.appendChild(el("th", { scope: "col" }, heading(k))); });
    t.appendChild(el("thead")).appendChild(head);
    var body = el("tbody");
    rows.forEach(function (r) {
      var tr = el("tr");
      keys.forEach(function (k) { tr.appendChild(el("td", { "class": typeof r[k] === "number" ? "num" : "" }, cell(r[k]))); });
      body.appendChild(tr);
    });
    t.appendChild(body);
    var wrap = el("div", { "class": "scroll" });
    wrap.appendChild(t);
    return wrap;
  }
  function renderStakes() {
    var box = clear($("stakes"));
    var entry = stakes.filter(function (s) { return s.option === ui.option; })[0];
    if (!entry) {
      box.appendChild(el("p", { "class": "sub" }, stakes.length ? "No staking plan for " + ui.option + " in plan.json." : "This plan has no staking plan (plan.json has no \u201cstakes\u201d)."));
      return;
    }
    box.appendChild(el("p", {}, entry.option + ": baseline along " + deg(entry.orientation_deg) + ". Element positions from element 1; north and east on the ground, latitude and longitude to set out with a receiver."));
    var plan = groundPlan(entry);
    if (plan) { box.appendChild(plan); }
    box.appendChild(objectTable(entry.elements || [], "stakes-table"));
    if (entry.junction !== undefined && entry.junction !== null) {
      box.appendChild(el("h3", {}, "Junction"));
      box.appendChild(typeof entry.junction === "object" && !Array.isArray(entry.junction) ? objectTable([entry.junction]) : el("p", {}, cell(entry.junction)));
    }
    if (Array.isArray(entry.runs) && entry.runs.length) {
      box.appendChild(el("h3", {}, "Runs"));
      box.appendChild(objectTable(entry.runs.map(function (r) { return typeof r === "object" ? r : { run: r }; })));
    }
  }

  /* ---------- header, notes ---------- */
  function renderStatic() {
    var st = PLAN.station || {};
    $("station-name").textContent = st.name || "Plan";
    document.title = (st.name || "Plan") + " \u2014 lobeplan plan";
    $("station-line").textContent = [st.locator, isNum(st.lat_deg) ? "lat " + st.lat_deg + "\u00b0, lon " + st.lon_deg + "\u00b0" : null,
      "propagation model: " + PLAN.model].filter(Boolean).join("  \u00b7  ");
    var best = (PLAN.ranking || [])[0];
    $("best-line").textContent = best ? "Best: " + best.option + ", baseline along " + deg(best.orientation_deg) + ", score " + db(best.score_db) + " over one vertical"
      : "No allowed bearing serves an open goal.";
    if (best) { $("best-line").setAttribute("data-score-db", best.score_db); }
    (PLAN.cautions || []).forEach(function (c) { $("cautions").appendChild(el("li", {}, c)); });
    (PLAN.caveats || []).forEach(function (c) { $("caveats").appendChild(el("li", {}, c)); });
    if (!(PLAN.caveats || []).length) { $("caveats").appendChild(el("li", {}, "none")); }
    $("footer").textContent = "Every figure on this page is read from plan.json, embedded in this file; the map outlines and lobe shapes are drawing only. Made by lobeplan; opens from disk with no network.";
  }

  function fillSelect(node, items, value) {
    clear(node);
    items.forEach(function (it) {
      var o = el("option", { value: it[0] }, it[1]);
      if (String(it[0]) === String(value)) { o.selected = true; }
      node.appendChild(o);
    });
  }
  function renderControls() {
    fillSelect($("ctl-option"), (comparison.length ? comparison : DRAW.options).map(function (c) {
      return [c.option, c.option + (isNum(c.spacing_m) ? " (" + c.spacing_m + " m)" : "")];
    }), ui.option);
    fillSelect($("ctl-band"), DRAW.bands.map(function (b) { return [b, b]; }), ui.band);
    var states = drawOption(ui.option).states;
    if (ui.state !== "best" && states.indexOf(ui.state) < 0) { ui.state = "best"; }
    fillSelect($("ctl-state"), [["best", scheduled[ui.option] ? "best (follows the schedule)" : "best (each goal's own)"]].concat(states.map(function (s) { return [s, s]; })), ui.state);
    var mSel = $("ctl-month"), hIn = $("ctl-hour");
    if (months.length) {
      fillSelect(mSel, months.map(function (m) { return [m, monthName(m)]; }), ui.month);
      mSel.disabled = months.length < 2;
      mSel.title = months.length < 2 ? "a single-month plan" : "";
    } else {
      fillSelect(mSel, [["", "no schedule"]], "");
      mSel.disabled = true;
    }
    hIn.disabled = !hours.length;
    if (hours.length) { hIn.min = hours[0]; hIn.max = hours[hours.length - 1]; }
    hIn.value = ui.hour;
    $("hour-out").textContent = hours.length ? hh(ui.hour) + ":00" : "all";
  }

  function renderAll() {
    var sel = selection();
    renderControls();
    renderMap(sel);
    renderLegend(sel);
    renderInfo();
    renderSchedule();
    renderTable(sel);
    renderStakes();
  }
  function setUi(change) {
    for (var k in change) { ui[k] = change[k]; }
    renderAll();
  }

  $("ctl-option").addEventListener("change", function (e) { setUi({ option: e.target.value }); });
  $("ctl-band").addEventListener("change", function (e) { setUi({ band: e.target.value }); });
  $("ctl-state").addEventListener("change", function (e) { setUi({ state: e.target.value }); });
  $("ctl-month").addEventListener("change", function (e) { setUi({ month: Number(e.target.value) }); });
  $("ctl-hour").addEventListener("input", function (e) {
    var v = Number(e.target.value), near = hours.reduce(function (a, h) { return Math.abs(h - v) < Math.abs(a - v) ? h : a; }, hours[0]);
    setUi({ hour: near });
  });
  $("controls").addEventListener("submit", function (e) { e.preventDefault(); });

  renderStatic();
  renderAll();
  document.documentElement.setAttribute("data-ready-ms", (performance.now() - T0).toFixed(1));
})();
