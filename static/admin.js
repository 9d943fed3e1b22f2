// Kinword suggestion review: the trend chart (uPlot), the terms table and
// the attention lists of /api/v1/review, each list row linking to a rule
// draft on the vocabulary desk.
(function () {
  "use strict";
  var K = window.KW, el = K.el, text = K.text;
  var state = { report: null, chart: null, filters: {} };

  var LISTS = [
    { key: "rarelyaccepted", table: "rarely_accepted", title: "Rarely accepted",
      what: "Offered often, accepted so rarely that even the upper end of the interval is low.",
      count: "Accepts", rate: "Corrected rate", high: true },
    { key: "oftendismissed", table: "often_dismissed", title: "Often set aside",
      what: "Searchers set these terms aside on a large share of impressions.", count: "Set aside", rate: "Share" },
    { key: "noresults", table: "no_results", title: "Queries with no results",
      what: "Searches that found no document; the draft relates the term that helped most, if any did.", count: "Empty searches", rate: "Share" },
    { key: "nosuggestions", table: "no_suggestions", title: "Queries offered no terms",
      what: "Searches that were offered no related term; pick a term on the desk.", count: "Without terms", rate: "Share" },
    { key: "rescued", table: "rescued", title: "Terms that rescued an empty search",
      what: "Accepting the term after a search with no results led to results; the draft pins it.", count: "Rescues", rate: "Share" }
  ];

  function params() { return state.filters; }

  function exports(box, tables) {
    box.textContent = "";
    box.appendChild(text("span", "CSV:", "kw-muted"));
    tables.forEach(function (t) {
      box.appendChild(K.exportLink(t[1], "/api/v1/review/export", Object.assign({ table: t[0] }, params()), "kinword-" + t[0] + ".csv"));
    });
  }

  function low(r) { return typeof r.low === "number" ? r.low : (r.interval || [])[0]; }
  function high(r) { return typeof r.high === "number" ? r.high : (r.interval || [])[1]; }

  // Trend chart.
  function color(name) { return window.getComputedStyle(document.documentElement).getPropertyValue(name).trim() || "#12343b"; }

  function chartData(points, mode) {
    var xs = points.map(function (p) { return Date.parse(p.start) / 1000; });
    if (mode === "rate") {
      return [xs, points.map(function (p) { return p.shown ? 100 * (p.rate || 0) : null; }),
        points.map(function (p) { return p.exposure ? 100 * (p.corrected || 0) : null; })];
    }
    return [xs, points.map(function (p) { return p.impressions || 0; }), points.map(function (p) { return p.accepts || 0; })];
  }

  // Ticks: bucket starts (UTC, like the buckets) when there are few.
  function bucketTicks(u) { return u.data[0].slice(); }
  function dayTicks(u, splits) {
    var daily = bucketName() === "day";
    return splits.map(function (s) { var iso = new Date(s * 1000).toISOString(); return daily ? iso.slice(5, 10) : iso.slice(5, 16).replace("T", " "); });
  }

  // xRange widens a one-bucket chart by half a bucket each side.
  function xRange(u, lo, hi) {
    if (lo !== hi) { return [lo, hi]; }
    var r = state.report || {}, half = (r.bucketseconds || 86400) / 2;
    return [lo - half, hi + half];
  }

  function xAxis(n) {
    var a = { stroke: color("--kw-muted"), values: dayTicks };
    if (n > 0 && n <= 14) { a.splits = bucketTicks; }
    return a;
  }

  function drawChart() {
    var box = el("trend-chart"), points = (state.report && state.report.trend) || [], mode = el("chart-mode").value;
    if (state.chart) { state.chart.destroy(); state.chart = null; }
    box.textContent = "";
    var labels = mode === "rate" ? ["Acceptance rate (%)", "Corrected for position (%)"] : ["Impressions", "Accepts"];
    var opts = {
      width: Math.max(box.clientWidth || 600, 280), height: 260,
      scales: { x: { time: true, range: xRange }, y: { range: function (u, lo, hi) { return [0, hi > 0 ? hi * 1.1 : 1]; } } },
      series: [{ label: "Day" },
        { label: labels[0], stroke: color("--kw-ink"), width: 2, points: { show: points.length < 40 } },
        { label: labels[1], stroke: color("--kw-accent"), width: 2, points: { show: points.length < 40 } }],
      axes: [xAxis(points.length), { stroke: color("--kw-muted"), label: mode === "rate" ? "%" : "count" }]
    };
    state.chart = new window.uPlot(opts, chartData(points, mode), box);
    box.setAttribute("aria-label", "Chart of " + labels.join(" and ").toLowerCase() + " per " + bucketName());
    summarise(points);
  }

  function bucketName() {
    var r = state.report || {}, sec = r.bucketseconds || (r.bucket ? r.bucket / 1e9 : 0);
    return !sec || sec === 86400 ? "day" : Math.round(sec / 3600) + "-hour period";
  }

  function summarise(points) {
    var imp = 0, acc = 0;
    points.forEach(function (p) { imp += p.impressions || 0; acc += p.accepts || 0; });
    el("trend-summary").textContent = points.length ? points.length + " " + bucketName() + (points.length === 1 ? "" : "s") +
      " from " + K.day(points[0].start) + " to " + K.day(points[points.length - 1].start) + ": " + imp + " impressions, " +
      acc + " accepts." : "No impressions in this period.";
  }

  function figures(r) {
    var box = el("figures");
    box.textContent = "";
    var overall = (r.terms || []).filter(function (t) { return !t.department; });
    var accepts = 0;
    overall.forEach(function (t) { accepts += t.accepts || 0; });
    [[r.impressions || 0, "impressions reviewed"], [accepts, "accepted terms"], [(r.terms || []).length, "term rows"],
      [r.unmatched || 0, "events matching no impression"]].forEach(function (f) {
      var d = text("div", null, "kw-figure");
      d.appendChild(text("strong", f[0]));
      d.appendChild(text("span", f[1]));
      box.appendChild(d);
    });
  }

  // Terms table.
  var terms = new K.Table(el("terms"), [
    { key: "term", label: "Term" },
    { key: "department", label: "Department", value: function (r) { return r.department || "all"; } },
    { key: "impressions", label: "Impressions", num: true },
    { key: "accepts", label: "Accepts", num: true },
    { key: "corrected", label: "Corrected rate (95% interval)", num: true, cell: function (r) {
      return K.pct(r.corrected) + " (" + K.pct(low(r)) + "\u2013" + K.pct(high(r)) + ")"; } },
    { key: "dismissals", label: "Set aside", num: true },
    { key: "successrate", label: "Followed by a click", num: true, cell: function (r) { return r.accepts ? K.pct(r.successrate) : "\u2013"; } }
  ], "No term was offered in this period.", 25);

  function showTerms() {
    var all = (state.report && state.report.terms) || [], q = el("terms-filter").value.trim().toLowerCase();
    var rows = all.filter(function (r) { return !q || String(r.term).toLowerCase().indexOf(q) >= 0; });
    terms.set(rows);
    el("terms-count").textContent = rows.length + " of " + all.length + " rows (one per term overall and per department)";
  }
  el("terms-filter").addEventListener("input", showTerms);

  // Attention lists.
  function draftLink(a) {
    var d = a.draft || {}, kind = d.kind || "relate", term = d.term !== undefined ? d.term : a.term;
    var u = new URL("/librarian", window.location.origin);
    u.searchParams.set("kind", kind);
    u.searchParams.set("query", d.query !== undefined ? d.query : (a.query || ""));
    u.searchParams.set("term", term || "");
    u.searchParams.set("department", d.department !== undefined ? d.department : (a.department || ""));
    var link = text("a", term ? "Draft: " + kind + " \u201c" + term + "\u201d" : "Draft: " + kind + " (choose a term)");
    link.href = u.pathname + u.search;
    link.className = "kw-draft";
    return link;
  }

  function showAttention() {
    var box = el("attention"), r = state.report || {};
    box.textContent = "";
    LISTS.forEach(function (l) {
      var rows = r[l.key] || [], sec = text("section", null, "kw-attention");
      sec.id = "att-" + l.table;
      var h = text("h3", l.title + " (" + rows.length + ")", "kw-label");
      h.id = sec.id + "-h";
      sec.setAttribute("aria-labelledby", h.id);
      sec.appendChild(h);
      sec.appendChild(text("p", l.what, "kw-muted"));
      var cols = [
        { key: "department", label: "Department", value: function (a) { return a.department || "all"; } },
        { key: "query", label: "Query" },
        { key: "term", label: "Term", value: function (a) { return a.term || ""; } },
        { key: "impressions", label: "Impressions", num: true },
        { key: "count", label: l.count, num: true },
        { key: "rate", label: l.rate, num: true, cell: function (a) { return K.pct(a.rate); } }
      ];
      if (l.high) { cols.push({ key: "high", label: "Upper bound", num: true, cell: function (a) { return K.pct(a.high); } }); }
      cols.push({ key: "draft", label: "Rule draft", sortable: false, cell: draftLink });
      var t = text("table", null, "kw-table"), wrap = text("div", null, "kw-table-wrap");
      new K.Table(t, cols, "Nothing here in this period.", 15).set(rows);
      wrap.appendChild(t);
      sec.appendChild(wrap);
      var ex = text("p", null, "kw-exports");
      exports(ex, [[l.table, l.title]]);
      sec.appendChild(ex);
      box.appendChild(sec);
    });
  }

  function departments(r) {
    var dl = el("p-dept-list"), seen = {};
    (r.terms || []).forEach(function (t) { if (t.department) { seen[t.department] = true; } });
    Object.keys(seen).sort().forEach(function (d) {
      if (!dl.querySelector('option[value="' + CSS.escape(d) + '"]')) { var o = document.createElement("option"); o.value = d; dl.appendChild(o); }
    });
  }

  function load() {
    var f = {};
    if (el("p-from").value) { f.from = el("p-from").value + "T00:00:00Z"; }
    if (el("p-to").value) { f.to = el("p-to").value + "T00:00:00Z"; }
    if (el("p-dept").value.trim()) { f.department = el("p-dept").value.trim(); }
    state.filters = f;
    K.say("Loading the review\u2026");
    return K.api("GET", "/api/v1/review", { params: f }).then(function (body) {
      var r = body.report || body;
      state.report = r;
      figures(r);
      drawChart();
      showTerms();
      showAttention();
      departments(r);
      exports(el("trend-exports"), [["trend", "trend"], ["term_trend", "trend per term"]]);
      exports(el("terms-exports"), [["terms", "terms"], ["pairs", "query and term pairs"]]);
      K.say("Review loaded: " + (r.impressions || 0) + " impressions" + (f.department ? " in " + f.department : "") + ".");
    }).catch(function (err) { K.say("The review could not be loaded: " + err.message, true); });
  }

  el("period").addEventListener("submit", function (e) { e.preventDefault(); load(); });
  el("chart-mode").addEventListener("change", function () { if (state.report) { drawChart(); } });
  var resizing = null;
  window.addEventListener("resize", function () {
    window.clearTimeout(resizing);
    resizing = window.setTimeout(function () {
      if (state.chart) { state.chart.setSize({ width: Math.max(el("trend-chart").clientWidth, 280), height: 260 }); }
    }, 150);
  });
  K.access(load);

  var p = new URLSearchParams(window.location.search);
  el("p-from").value = (p.get("from") || "").slice(0, 10);
  el("p-to").value = (p.get("to") || "").slice(0, 10);
  el("p-dept").value = p.get("department") || "";
  load();
})();
