// Kinword vocabulary desk: draft, preview, save, edit and delete curation
// rules; read and revert the change log; import and export rule files.
(function () {
  "use strict";
  var K = window.KW, el = K.el, text = K.text;
  var RULES = "/api/v1/rules";
  var state = { rules: [], editing: null, logRule: "" };
  var HELP = {
    relate: "Offers the term as a related term for queries containing the query text.",
    pin: "Always offers the term, first, for queries containing the query text.",
    block: "Never offers the term; with no query text, for every query.",
    use: "ANSI/NISO Z39.19 equivalence: the query text is the non-preferred form, the term the preferred one.",
    broader: "The term is broader than the query text; offered as a way to widen the search.",
    narrower: "The term is narrower than the query text; offered as a refinement."
  };

  function describe(r) {
    return (r.kind || "?") + " \u201c" + (r.term || "") + "\u201d" + (r.query ? " for \u201c" + r.query + "\u201d" : "") +
      (r.department ? " in " + r.department : "");
  }

  // draft reads the form into an API body; empty dates are left out.
  function draft() {
    var d = { kind: el("f-kind").value, query: el("f-query").value.trim(), term: el("f-term").value.trim(),
      department: el("f-department").value.trim(), reason: el("f-reason").value.trim(),
      lang: el("f-lang").value.trim().toLowerCase(), why: el("f-why").value.trim() };
    if (el("f-start").value) { d.start = el("f-start").value + "T00:00:00Z"; }
    if (el("f-expiry").value) { d.expiry = el("f-expiry").value + "T00:00:00Z"; }
    if (state.editing) { d.version = state.editing.version; }
    return d;
  }

  function fill(r) {
    el("f-kind").value = HELP[r.kind] ? r.kind : "relate";
    el("f-query").value = r.query || "";
    el("f-term").value = r.term || "";
    el("f-department").value = r.department || "";
    el("f-start").value = K.day(r.start);
    el("f-expiry").value = K.day(r.expiry);
    el("f-reason").value = r.reason || "";
    el("f-lang").value = r.lang || "";
    el("f-why").value = "";
    showHelp();
  }

  function showHelp() { el("kind-help").textContent = HELP[el("f-kind").value] || ""; }

  function setEditing(r) {
    state.editing = r;
    el("draft-mode").textContent = r ? "(editing " + (r.id || "") + ", version " + r.version + ")" : "(new)";
    el("save-btn").textContent = r ? "Save changes" : "Save rule";
    el("preview").textContent = "";
  }

  // termList lists terms, marking with cls those missing from other.
  function termList(terms, other, cls) {
    var ul = text("ul", null, "kw-terms");
    (terms || []).forEach(function (t) {
      var s = typeof t === "string" ? t : (t.display || t.term || "");
      var li = text("li", s);
      if (other.indexOf(s) < 0) { li.className = cls; }
      ul.appendChild(li);
    });
    if (!ul.children.length) { ul.appendChild(text("li", "none", "kw-muted")); }
    return ul;
  }

  function names(terms) { return (terms || []).map(function (t) { return typeof t === "string" ? t : (t.display || t.term || ""); }); }

  function renderPreview(p) {
    var box = el("preview");
    box.textContent = "";
    box.appendChild(text("p", (p.changed || 0) + " of " + (p.impressions || 0) +
      " impressions of the last 30 days would have shown different terms with this rule.", "kw-note"));
    var samples = p.samples || [];
    if (!samples.length) { return; }
    var t = text("table", null, "kw-table");
    t.appendChild(text("caption", "Examples: struck-through terms would no longer be offered; highlighted ones would be new"));
    var tb = new K.Table(t, [
      { key: "department", label: "Department", value: function (s) { return s.department || "all"; } },
      { key: "query", label: "Query" },
      { key: "before", label: "Offered now", sortable: false, cell: function (s) { return termList(s.before, names(s.after), "kw-gone"); } },
      { key: "after", label: "Offered with the rule", sortable: false, cell: function (s) { return termList(s.after, names(s.before), "kw-new"); } }
    ]);
    tb.set(samples);
    var wrap = text("div", null, "kw-table-wrap");
    wrap.appendChild(t);
    box.appendChild(wrap);
  }

  el("f-kind").addEventListener("change", showHelp);
  el("preview-btn").addEventListener("click", function () {
    K.say("Previewing\u2026");
    K.api("POST", RULES + "/preview", { body: draft() }).then(function (p) {
      renderPreview(p);
      K.say("Preview ready: " + (p.changed || 0) + " of " + (p.impressions || 0) + " impressions change.");
    }).catch(function (err) { K.say("Preview failed: " + err.message, true); });
  });
  el("reset-btn").addEventListener("click", function () {
    setEditing(null); fill({ kind: "relate" }); K.say("Form cleared.");
  });
  el("draft").addEventListener("submit", function (e) {
    e.preventDefault();
    var d = draft(), editing = state.editing;
    if (!d.term) { K.say("A rule needs a term.", true); el("f-term").focus(); return; }
    var call = editing ? K.api("PUT", RULES + "/" + encodeURIComponent(editing.id), { body: d }) : K.api("POST", RULES, { body: d });
    call.then(function (r) {
      K.say((editing ? "Changed " : "Saved ") + describe(r.id ? r : d) + ".");
      setEditing(null); fill({ kind: d.kind });
      reload();
    }).catch(function (err) {
      K.say("Not saved: " + err.message, true);
      if (err.status === 409) { reload(); }
    });
  });

  // Rules table and its filters.
  var table = new K.Table(el("rules"), [
    { key: "kind", label: "Kind", cell: function (r) { return text("span", r.kind, "kw-kind kw-kind-" + r.kind); } },
    { key: "query", label: "Query", value: function (r) { return r.query || ""; } },
    { key: "term", label: "Term" },
    { key: "department", label: "Department", value: function (r) { return r.department || "whole organisation"; } },
    { key: "start", label: "From", value: function (r) { return K.day(r.start); } },
    { key: "expiry", label: "Until", value: function (r) { return K.day(r.expiry); } },
    { key: "reason", label: "Reason" },
    { key: "updated", label: "Changed", value: function (r) { return K.day(r.updated); } },
    { key: "actions", label: "Actions", sortable: false, cell: actions }
  ], "No rule matches.");

  function actions(r) {
    var span = text("span", null, "kw-actions");
    span.appendChild(K.button("Edit", "kw-quiet kw-small", function () {
      setEditing(r); fill(r); el("f-term").focus(); K.say("Editing " + describe(r) + ".");
    }, "Edit " + describe(r)));
    span.appendChild(K.button("History", "kw-quiet kw-small", function () { loadLog(r.id); }, "Change log of " + describe(r)));
    span.appendChild(K.button("Delete", "kw-danger kw-small", function () {
      var why = window.prompt("Delete " + describe(r) + "? Note for the change log:", "");
      if (why === null) { return; }
      K.api("DELETE", RULES + "/" + encodeURIComponent(r.id), { params: { version: r.version, why: why } }).then(function () {
        K.say("Deleted " + describe(r) + ".");
        if (state.editing && state.editing.id === r.id) { setEditing(null); }
        reload();
      }).catch(function (err) { K.say("Not deleted: " + err.message, true); if (err.status === 409) { reload(); } });
    }, "Delete " + describe(r)));
    return span;
  }

  function options(sel, values, keep) {
    var cur = sel.value;
    while (sel.options.length > 1) { sel.remove(1); }
    values.forEach(function (v) { var o = text("option", v === "(all)" ? "whole organisation" : v); o.value = v; sel.appendChild(o); });
    sel.value = values.indexOf(cur) >= 0 ? cur : keep;
  }

  function uniq(xs) { return xs.filter(function (x, i) { return x && xs.indexOf(x) === i; }).sort(); }

  function applyFilter() {
    var kind = el("flt-kind").value, dept = el("flt-dept").value, q = el("flt-text").value.trim().toLowerCase();
    var rows = state.rules.filter(function (r) {
      if (kind && r.kind !== kind) { return false; }
      if (dept && (r.department || "(all)") !== dept) { return false; }
      return !q || [r.query, r.term, r.reason].join(" ").toLowerCase().indexOf(q) >= 0;
    });
    table.set(rows);
    el("rules-count").textContent = rows.length + " of " + state.rules.length + " rules shown";
  }

  function loadRules() {
    return K.api("GET", RULES).then(function (body) {
      state.rules = body.rules || [];
      options(el("flt-kind"), uniq(state.rules.map(function (r) { return r.kind; })), "");
      var depts = uniq(state.rules.map(function (r) { return r.department || "(all)"; }));
      options(el("flt-dept"), depts, "");
      var dl = el("dept-list");
      dl.textContent = "";
      depts.forEach(function (d) { if (d !== "(all)") { var o = document.createElement("option"); o.value = d; dl.appendChild(o); } });
      applyFilter();
    }).catch(function (err) {
      el("rules-count").textContent = "Rules could not be loaded: " + err.message;
      K.say("Rules could not be loaded: " + err.message, true);
    });
  }
  ["flt-kind", "flt-dept"].forEach(function (id) { el(id).addEventListener("change", applyFilter); });
  el("flt-text").addEventListener("input", applyFilter);
  el("rule-filter").addEventListener("submit", function (e) { e.preventDefault(); applyFilter(); });

  // Change log.
  function loadLog(rule) {
    state.logRule = rule || "";
    el("log-scope").textContent = state.logRule ? "(rule " + state.logRule + ")" : "(latest changes)";
    el("log-all").hidden = !state.logRule;
    return K.api("GET", RULES + "/audit", { params: { rule: state.logRule, limit: 50 } }).then(function (body) {
      var ol = el("log"), entries = body.entries || [];
      ol.textContent = "";
      if (!entries.length) { ol.appendChild(text("li", "No changes recorded.", "kw-muted")); }
      entries.forEach(function (e) {
        var li = document.createElement("li"), what = e.after || e.before;
        li.appendChild(text("code", "#" + e.seq));
        li.appendChild(text("span", e.at ? new Date(e.at).toLocaleString() : "", "kw-muted"));
        li.appendChild(text("strong", e.action));
        li.appendChild(text("span", what ? describe(what) : (e.ruleid || "")));
        li.appendChild(text("span", "by " + (e.actor || "unknown"), "kw-muted"));
        if (e.reason) { li.appendChild(text("em", e.reason)); }
        li.appendChild(K.button("Revert", "kw-quiet kw-small", function () {
          var why = window.prompt("Revert change #" + e.seq + "? Note for the change log:", "");
          if (why === null) { return; }
          K.api("POST", RULES + "/audit/" + encodeURIComponent(e.seq) + "/revert", { body: { why: why } }).then(function () {
            K.say("Reverted change #" + e.seq + ".");
            reload();
          }).catch(function (err) { K.say("Not reverted: " + err.message, true); });
        }, "Revert change " + e.seq + ", " + e.action + (what ? " of " + describe(what) : "")));
        ol.appendChild(li);
      });
    }).catch(function (err) { el("log").textContent = "The change log could not be loaded: " + err.message; });
  }
  el("log-all").addEventListener("click", function () { loadLog(""); });

  function reload() { loadRules(); loadLog(state.logRule); }
  K.access(reload);
  window.KWLibrarian = { reload: reload };

  // A draft handed over in the URL (the review page links here).
  var p = new URLSearchParams(window.location.search);
  if (p.get("kind") || p.get("query") || p.get("term")) {
    fill({ kind: p.get("kind") || "relate", query: p.get("query") || "", term: p.get("term") || "", department: p.get("department") || "" });
    el("f-why").value = "Drafted from the suggestion review";
    K.say("A draft from the review page is in the form: preview it, check it and save.");
    (p.get("term") ? el("preview-btn") : el("f-term")).focus();
  } else {
    showHelp();
  }
  reload();
})();
