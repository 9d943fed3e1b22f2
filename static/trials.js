// Kinword suggestion review: trials of a proposed change (rules to add or
// remove, the automatic mode) on the judged topics, through /api/v1/trials.
// The server runs and stores each trial; this page only drafts and shows.
(function () {
  "use strict";
  var K = window.KW, el = K.el, text = K.text;
  var draft = [];
  var VIEWS = { search: "Query as typed", first: "First suggestion accepted", best: "Best of the first suggestions" };

  function f4(x) { return typeof x === "number" && isFinite(x) ? x.toFixed(4) : "\u2013"; }

  function showDraft() {
    var ul = el("t-rules");
    ul.textContent = "";
    draft.forEach(function (r, i) {
      var li = document.createElement("li");
      li.appendChild(text("span", r.kind, "kw-kind kw-kind-" + r.kind));
      li.appendChild(text("span", (r.query ? "\u201c" + r.query + "\u201d \u2192 " : "every query \u2192 ") + r.term));
      if (r.department) { li.appendChild(text("span", r.department, "kw-muted")); }
      li.appendChild(K.button("Take out", "kw-quiet kw-small", function () { draft.splice(i, 1); showDraft(); }, "Take rule " + (i + 1) + " out of the proposal"));
      ul.appendChild(li);
    });
    el("trial-rules-count").textContent = draft.length ? draft.length + " rule(s) in the proposal." : "No rules in the proposal yet.";
  }

  function proposal() {
    var p = { title: el("t-title").value.trim(), add: draft.slice() };
    var rm = el("t-remove").value.split(",").map(function (s) { return s.trim(); }).filter(Boolean);
    if (rm.length) { p.remove = rm; }
    if (el("t-auto").value) { p.auto_expand = el("t-auto").value === "true"; }
    if (el("t-weight").value) { p.accepted_weight = Number(el("t-weight").value); }
    return p;
  }

  // show renders one report: a table of the three views and the changed
  // suggestions, with a Markdown download.
  function show(r) {
    var box = el("trial-result");
    box.textContent = "";
    box.appendChild(text("h3", "Trial: " + (r.proposal && r.proposal.title || r.id)));
    box.appendChild(text("p", r.topics + " judged topics from " + r.collection + ", " + r.changed + " changed; rules in force " +
      r.rulesinforce + ", proposed " + r.rulesproposed + ". Run by " + r.actor + " on " + K.day(r.created) + ".", "kw-muted"));
    var t = document.createElement("table");
    t.className = "kw-table";
    t.id = "trial-views";
    box.appendChild(t);
    var rows = (r.views || []).map(function (v) {
      var runs = (v.report && v.report.runs) || [], c = runs[0] || {}, p = runs[1] || {};
      return { view: VIEWS[v.name] || v.name, cmap: c.map, pmap: p.map, cndcg: c.ndcgat10, pndcg: p.ndcgat10,
        helped: p.helped, hurt: p.hurt, p: p.pvalue };
    });
    new K.Table(t, [
      { key: "view", label: "View" },
      { key: "cmap", label: "MAP now", num: true, cell: function (x) { return f4(x.cmap); } },
      { key: "pmap", label: "MAP proposed", num: true, cell: function (x) { return f4(x.pmap); } },
      { key: "cndcg", label: "nDCG@10 now", num: true, cell: function (x) { return f4(x.cndcg); } },
      { key: "pndcg", label: "nDCG@10 proposed", num: true, cell: function (x) { return f4(x.pndcg); } },
      { key: "helped", label: "Helped", num: true }, { key: "hurt", label: "Hurt", num: true },
      { key: "p", label: "p", num: true, cell: function (x) { return f4(x.p); } }
    ], "No views.").set(rows);
    if ((r.samples || []).length) {
      var s = document.createElement("table");
      s.className = "kw-table";
      box.appendChild(s);
      new K.Table(s, [{ key: "qid", label: "Topic" }, { key: "query", label: "Query" },
        { key: "before", label: "Suggestions now", value: function (x) { return (x.before || []).join(", "); } },
        { key: "after", label: "Suggestions proposed", value: function (x) { return (x.after || []).join(", "); } }], "").set(r.samples);
    }
    var links = text("p", "", "kw-exports");
    links.appendChild(K.exportLink("Markdown report", "/api/v1/trials/" + encodeURIComponent(r.id), { format: "markdown" }, "kinword-trial-" + r.id + ".md"));
    links.appendChild(K.exportLink("CSV", "/api/v1/trials/" + encodeURIComponent(r.id), { format: "csv" }, "kinword-trial-" + r.id + ".csv"));
    box.appendChild(links);
  }

  var list = null;
  function loadList() {
    return K.api("GET", "/api/v1/trials").then(function (body) {
      if (!list) {
        list = new K.Table(el("trials"), [
          { key: "created", label: "When", value: function (x) { return K.day(x.created); } },
          { key: "title", label: "Title" }, { key: "actor", label: "By" },
          { key: "id", label: "Report", sortable: false, cell: function (x) {
            return K.button("Show", "kw-quiet kw-small", function () { open(x.id); }, "Show trial " + x.title);
          } }
        ], "No trials yet.", 20);
      }
      list.set(body.trials || []);
    }).catch(function (err) { if (err.status !== 503) { K.say("Trials could not be listed: " + err.message, true); } });
  }

  function open(id) {
    K.api("GET", "/api/v1/trials/" + encodeURIComponent(id)).then(show)
      .catch(function (err) { K.say("The trial could not be shown: " + err.message, true); });
  }

  el("t-add").addEventListener("click", function () {
    var r = { kind: el("t-kind").value, query: el("t-query").value.trim(), term: el("t-term").value.trim() };
    if (el("t-dept").value.trim()) { r.department = el("t-dept").value.trim(); }
    if (!r.term) { K.say("A rule needs a term.", true); el("t-term").focus(); return; }
    draft.push(r);
    el("t-query").value = ""; el("t-term").value = "";
    showDraft();
    K.say("Rule added to the proposal.");
  });

  el("trial-form").addEventListener("submit", function (e) {
    e.preventDefault();
    var btn = el("t-run");
    btn.disabled = true;
    K.say("Running the trial on the judged topics\u2026");
    K.api("POST", "/api/v1/trials", { body: proposal() }).then(function (r) {
      show(r);
      K.say("Trial stored: " + r.changed + " of " + r.topics + " topics changed.");
      return loadList();
    }).catch(function (err) { K.say("The trial did not run: " + err.message, true); })
      .then(function () { btn.disabled = false; });
  });

  K.access(loadList);
  loadList();
})();
