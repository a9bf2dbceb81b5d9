(function () {
  "use strict";
  var rec = window.__reportError || function () {};
  try {
    setupSorting();
    setupExplore();
  } catch (e) {
    rec("report script: " + (e && e.stack ? e.stack : e));
  }
  var res = (window.performance && performance.getEntriesByType) ? performance.getEntriesByType("resource").length : -1;
  document.documentElement.setAttribute("data-resources", String(res));
  document.documentElement.setAttribute("data-ready", "1");

  function cellValue(td) {
    var v = td.getAttribute("data-v");
    if (v !== null && v !== "") { var n = parseFloat(v); if (!isNaN(n)) { return n; } }
    return td.textContent.trim().toLowerCase();
  }

  function setupSorting() {
    var tables = document.querySelectorAll("table.sortable");
    Array.prototype.forEach.call(tables, function (tbl) {
      if (!tbl.tHead || !tbl.tBodies.length) { return; }
      var ths = tbl.tHead.rows[0].cells;
      Array.prototype.forEach.call(ths, function (th, col) {
        th.setAttribute("tabindex", "0");
        th.title = "Click to sort";
        function sort() {
          var asc = th.getAttribute("aria-sort") !== "ascending";
          Array.prototype.forEach.call(ths, function (o) { o.removeAttribute("aria-sort"); });
          th.setAttribute("aria-sort", asc ? "ascending" : "descending");
          var tb = tbl.tBodies[0];
          var rows = Array.prototype.slice.call(tb.rows);
          rows.forEach(function (r, i) { r.__i = i; });
          rows.sort(function (a, b) {
            var x = cellValue(a.cells[col]), y = cellValue(b.cells[col]), r;
            if (typeof x === "number" && typeof y === "number") { r = x - y; }
            else if (typeof x === "number") { r = -1; }
            else if (typeof y === "number") { r = 1; }
            else { r = x < y ? -1 : (x > y ? 1 : 0); }
            if (r === 0) { r = a.__i - b.__i; return r; }
            return asc ? r : -r;
          });
          rows.forEach(function (r) { tb.appendChild(r); });
        }
        th.addEventListener("click", sort);
        th.addEventListener("keydown", function (ev) { if (ev.key === "Enter" || ev.key === " ") { ev.preventDefault(); sort(); } });
      });
    });
  }

  function setupExplore() {
    var data = JSON.parse(document.getElementById("report-data").textContent);
    var selM = document.getElementById("sel-model");
    var selE = document.getElementById("sel-extent");
    var svg = document.getElementById("fig-teach");
    var box = document.getElementById("teach-numbers");
    if (!data.models.length || !data.extents.length) {
      document.getElementById("teach-sentence").textContent = "No scored extent to show.";
      return;
    }
    // Maps keyed by names are objects without a prototype: a model may
    // be called "__proto__" or "constructor", which a plain {} would
    // resolve to its prototype, which the menu then printed.
    var labels = Object.create(null);
    data.models.forEach(function (m, i) { labels[m] = data.labels[i] || m; selM.appendChild(new Option(labels[m], m)); });
    // who names the chosen model in a sentence: "model good", or a null by its label.
    function who(m) { return labels[m] === m ? "model " + m : labels[m]; }
    data.extents.forEach(function (e) { selE.appendChild(new Option(e.id + " (" + e.area + " km²)", e.id)); });
    var cells = Object.create(null);
    data.cells.forEach(function (c) { cells[c.model + "\u0000" + c.extent] = c; });

    function fromHash() {
      var h = (window.location.hash || "").replace(/^#/, "");
      var out = Object.create(null);
      h.split("&").forEach(function (kv) {
        var i = kv.indexOf("=");
        if (i > 0) { out[decodeURIComponent(kv.slice(0, i))] = decodeURIComponent(kv.slice(i + 1)); }
      });
      return out;
    }
    function has(sel, v) { return Array.prototype.some.call(sel.options, function (o) { return o.value === v; }); }
    function applyHash() {
      var h = fromHash();
      selM.value = (h.model && has(selM, h.model)) ? h.model : data.models[0];
      selE.value = (h.extent && has(selE, h.extent)) ? h.extent : data.default_extent;
      draw();
    }
    selM.addEventListener("change", draw);
    selE.addEventListener("change", draw);
    document.getElementById("btn-prev").addEventListener("click", function () { step(-1); });
    document.getElementById("btn-next").addEventListener("click", function () { step(1); });
    window.addEventListener("hashchange", applyHash);
    applyHash();

    function step(d) {
      var i = selE.selectedIndex + d;
      if (i >= 0 && i < selE.options.length) { selE.selectedIndex = i; draw(); }
    }
    // fx writes v with n decimals as the report's tables do (Go's
    // strconv): the exact value rounded, a tie to the even digit.
    // toFixed rounds the exact value but a tie away from zero, so
    // 0.8125 would read 0.813 here and 0.812 in the tables.
    function fx(v, n) {
      var s = v.toFixed(n);
      var long = Math.abs(v).toFixed(Math.min(100, n + 60));
      var dot = long.indexOf(".");
      if (/^50*$/.test(long.slice(dot + 1 + n))) {
        var cut = long.slice(0, n > 0 ? dot + 1 + n : dot);
        if (parseInt(cut.charAt(cut.length - 1), 10) % 2 === 0) { s = (v < 0 ? "-" : "") + cut; }
      }
      return /^-0(\.0*)?$/.test(s) ? s.slice(1) : s;
    }
    function el(name, attrs, text) {
      var e = document.createElementNS("http://www.w3.org/2000/svg", name);
      for (var k in attrs) { if (Object.prototype.hasOwnProperty.call(attrs, k)) { e.setAttribute(k, attrs[k]); } }
      if (text !== undefined) { e.textContent = text; }
      svg.appendChild(e);
      return e;
    }
    // bandWords ends the explorer's sentence with what the shading is.
    function bandWords() {
      var b = data.bands;
      if (!b.length) { return "."; }
      if (b.length === 1) { return "; shaded band: the partial ROC region (omission at most E = " + b[0].e + ")."; }
      var es = b.map(function (x) { return String(x.e); });
      return "; shaded bands: the partial ROC region of each E (" + es.slice(0, -1).join(", ") + " and " + es[es.length - 1] +
        "; the smallest E's the darkest, at the top; each larger E's region is its own band and every band above it)" +
        (data.unshaded ? "; E = " + data.unshaded + " not shaded (the partial ROC table gives their ratios)." : ".");
    }
    function draw() {
      var m = selM.value, eid = selE.value;
      var c = cells[m + "\u0000" + eid];
      var ext = data.extents[selE.selectedIndex];
      while (svg.firstChild) { svg.removeChild(svg.firstChild); }
      var L = 48, T = 12, W = 296, H = 280;
      function X(x) { return L + x * W; }
      function Y(y) { return T + (1 - y) * H; }
      el("rect", { x: L, y: T, width: W, height: H, fill: "#fff", stroke: "#333", "stroke-width": 1 });
      // The partial ROC region of each E shaded as the ROC figure's
      // panels shade it: the smallest E's band darkest, at the top.
      data.bands.forEach(function (b) {
        var g = "rgb(" + b.grey + "," + b.grey + "," + b.grey + ")";
        el("rect", { x: L, y: Y(b.hi), width: W, height: Y(b.lo) - Y(b.hi), fill: g });
      });
      [0, 0.25, 0.5, 0.75, 1].forEach(function (t) {
        el("line", { x1: X(t), y1: Y(0), x2: X(t), y2: Y(0) + 4, stroke: "#333" });
        el("text", { x: X(t), y: Y(0) + 15, "font-size": 10, "text-anchor": "middle" }, String(t));
        el("line", { x1: X(0) - 4, y1: Y(t), x2: X(0), y2: Y(t), stroke: "#333" });
        el("text", { x: X(0) - 7, y: Y(t) + 3, "font-size": 10, "text-anchor": "end" }, String(t));
      });
      el("text", { x: X(0.5), y: Y(0) + 30, "font-size": 11, "text-anchor": "middle" }, "share of extent area predicted present");
      el("text", { x: 12, y: Y(0.5), "font-size": 11, "text-anchor": "middle", transform: "rotate(-90 12 " + Y(0.5) + ")" }, "share of test presences");
      el("line", { x1: X(0), y1: Y(0), x2: X(1), y2: Y(1), stroke: "#777", "stroke-dasharray": "2 3" });
      data.extents.forEach(function (e) {
        var o = cells[m + "\u0000" + e.id];
        if (!o || !o.scored || e.id === eid || !o.x.length) { return; }
        el("polyline", { points: pts(o), fill: "none", stroke: "#b5b5b5", "stroke-width": 1 });
      });
      var tbl = document.getElementById("teach-table");
      while (tbl.firstChild) { tbl.removeChild(tbl.firstChild); }
      function row(k, v) {
        var tr = document.createElement("tr");
        var a = document.createElement("td"); a.textContent = k;
        var b = document.createElement("td"); b.textContent = v;
        tr.appendChild(a); tr.appendChild(b); tbl.appendChild(tr);
      }
      var sent = document.getElementById("teach-sentence");
      box.setAttribute("data-extent", eid);
      box.setAttribute("data-model", m);
      if (!c || !c.scored) {
        var w = who(m);
        sent.textContent = w.charAt(0).toUpperCase() + w.slice(1) + " is not scored on " + eid + (c && c.reason ? ": " + c.reason : "") + ".";
        box.setAttribute("data-auc", "");
      } else {
        if (c.x.length) { el("polyline", { points: pts(c), fill: "none", stroke: "#000", "stroke-width": 2.4 }); }
        el("text", { x: X(0.96), y: Y(0.06), "font-size": 14, "text-anchor": "end", "font-weight": "bold" }, "AUC " + fx(c.auc, 3));
        sent.textContent = "On " + eid + (eid === data.base_extent ? ", " + data.base_word : "") + " (" + ext.params + ", " + ext.area + " km², " + c.test_points + (c.test_points === 1 ? " test point) " : " test points) ") + who(m) +
          " has AUC " + fx(c.auc, 3) + (c.partial_roc_ok ? " and partial ROC ratio " + fx(c.partial_roc, 3) : "") + ". Black: this extent; grey: the same model or null on the other extents" +
          bandWords();
        row("extent area", ext.area + " km²");
        row("test points", String(c.test_points));
        row("AUC", fx(c.auc, 3) + (c.auc_sd_none ? "" : " (SD over the full-size paired resamples " + fx(c.auc_sd, 3) + ")"));
        [{ e: data.e, ratio: c.partial_roc, ok: c.partial_roc_ok, low: c.partial_roc_low, high: c.partial_roc_high, no_interval: c.partial_roc_no_interval }].concat(c.more_partial_roc).forEach(function (p) {
          if (!p.ok) { return; }
          row("partial ROC ratio, E = " + p.e, fx(p.ratio, 3) + (p.no_interval ?
            " (full sample; too few test points for the percentiles of " + data.bootstrap + ")" :
            " (full sample; 2.5th to 97.5th percentile of " + data.bootstrap + ": " + fx(p.low, 3) + " to " + fx(p.high, 3) + ")"));
        });
        if (c.threshold_ok) {
          row("omission at minimum training presence", fx(c.omission, 3));
          row("predicted area at that threshold (share of the extent)", fx(c.area_fraction, 3));
        }
        box.setAttribute("data-auc", String(c.auc));
      }
      var steps = document.getElementById("teach-steps");
      while (steps.firstChild) { steps.removeChild(steps.firstChild); }
      data.extents.forEach(function (e, i) {
        var o = cells[m + "\u0000" + e.id];
        var b = document.createElement("button");
        b.type = "button";
        b.textContent = e.id + ": " + (o && o.scored ? fx(o.auc, 3) : "–");
        if (e.id === eid) { b.className = "current"; }
        b.addEventListener("click", function () { selE.selectedIndex = i; draw(); });
        steps.appendChild(b);
      });
      function pts(o) {
        var s = [];
        for (var i = 0; i < o.x.length; i++) { s.push(fx(X(o.x[i]), 1) + "," + fx(Y(o.y[i]), 1)); }
        return s.join(" ");
      }
    }
  }
})();
