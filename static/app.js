// Kinword search page: plain script, no build step.
(function () {
  "use strict";
  var state = { q: "", accepted: [], dismissed: {}, persona: "", impression: "", useful: {} };

  function eventID() {
    var b = new Uint8Array(16);
    window.crypto.getRandomValues(b);
    return Array.prototype.map.call(b, function (x) { return ("0" + x.toString(16)).slice(-2); }).join("");
  }

  // Events go out one batch at a time, in order, so an accept never
  // overtakes the impression it refers to.
  var queue = Promise.resolve();
  function signal(ev) {
    ev.id = eventID();
    ev.impression = ev.impression || state.impression;
    ev.query = state.q;
    var u = new URL("/api/v1/signals", window.location.origin);
    if (state.persona) { u.searchParams.set("persona", state.persona); }
    queue = queue.then(function () {
      return fetch(u, { method: "POST", keepalive: true, headers: { "Content-Type": "application/json" },
        body: JSON.stringify({ events: [ev] }) }).catch(function () {});
    });
    return queue;
  }
  var el = function (id) { return document.getElementById(id); };

  function api(path, params) {
    var u = new URL(path, window.location.origin);
    Object.keys(params).forEach(function (k) { if (params[k]) u.searchParams.set(k, params[k]); });
    if (state.persona) u.searchParams.set("persona", state.persona);
    return fetch(u, { headers: { "Accept": "application/json" } }).then(function (r) {
      return r.json().then(function (body) {
        if (!r.ok) {
          var e = new Error((body.error && body.error.message) || r.statusText);
          e.code = body.error && body.error.code;
          throw e;
        }
        return body;
      });
    });
  }

  function text(tag, s, cls) {
    var n = document.createElement(tag);
    n.textContent = s;
    if (cls) { n.className = cls; }
    return n;
  }

  // marked renders a snippet's segments, matches highlighted, as text.
  function marked(segments) {
    var p = document.createElement("p");
    p.className = "kw-snippet";
    (segments || []).forEach(function (s) {
      p.appendChild(s.mark ? text("mark", s.text) : document.createTextNode(s.text));
    });
    return p;
  }

  function chip(label, title, onAccept, onDismiss, acceptLabel) {
    var li = document.createElement("li");
    var b = text("button", label, "kw-chip");
    b.type = "button";
    b.title = title;
    b.setAttribute("aria-label", acceptLabel + " " + label);
    b.addEventListener("click", onAccept);
    b.addEventListener("keydown", function (e) {
      if ((e.key === "Escape" || e.key === "Delete") && onDismiss) { e.preventDefault(); onDismiss(); }
    });
    li.appendChild(b);
    if (onDismiss) {
      var x = text("button", "\u00d7", "kw-chip-x");
      x.type = "button";
      x.setAttribute("aria-label", "Set aside " + label);
      x.addEventListener("click", onDismiss);
      li.appendChild(x);
    }
    return li;
  }

  function render(resp) {
    var sugg = el("suggestions"), acc = el("accepted"), res = el("results");
    sugg.textContent = ""; acc.textContent = ""; res.textContent = "";
    state.accepted.forEach(function (a) {
      acc.appendChild(chip(a.display, "Remove this term", function () {
        state.accepted = state.accepted.filter(function (x) { return x.term !== a.term; });
        run();
      }, null, "Remove"));
    });
    el("accepted-box").hidden = state.accepted.length === 0;
    var shown = resp.suggestions.filter(function (s) { return !state.dismissed[s.term]; });
    if (resp.impression !== state.impression && shown.length) {
      state.impression = resp.impression;
      signal({ kind: "impression", terms: shown.map(function (s) { return s.term; }),
        sources: shown.map(function (s) { return s.evidence.sources.join("+"); }) });
    }
    shown.forEach(function (s, pos) {
      var why = "Offered from " + s.evidence.sources.join(" and ") + "; in " + s.evidence.feedback_docs + " of your top results";
      sugg.appendChild(chip(s.display, why, function () {
        signal({ kind: "accept", term: s.term, position: pos });
        state.accepted.push({ term: s.term, display: s.display });
        run();
      }, function () {
        signal({ kind: "dismiss", term: s.term, position: pos });
        state.dismissed[s.term] = true; render(resp);
      }, "Add"));
    });
    el("sugg-box").hidden = shown.length === 0;
    var status = resp.total + (resp.total === 1 ? " document" : " documents") + " found";
    if (resp.expanded && resp.expanded.length) {
      // The automatic mode added these words from your own top results.
      status += "; also searched for " + resp.expanded.map(function (x) { return x.display; }).join(", ");
    }
    el("status").textContent = status;
    resp.results.forEach(function (r) {
      var li = document.createElement("li");
      var a = text("a", r.title, "kw-title");
      a.href = r.url || "#";
      a.addEventListener("click", function () {
        // Every result click is implicit feedback (the server learns from
        // the snippet shown); rank is 0-based, as the events API says.
        signal({ kind: "click", doc: r.id, rank: r.rank - 1, terms: state.accepted.map(function (x) { return x.term; }) });
      });
      li.appendChild(a);
      li.appendChild(text("span", r.department, "kw-dept"));
      var u = text("button", state.useful[r.id] ? "Marked useful" : "Useful", "kw-useful");
      u.type = "button";
      u.setAttribute("aria-pressed", state.useful[r.id] ? "true" : "false");
      u.setAttribute("aria-label", "Mark " + r.title + " as useful; results and related terms will lean towards it");
      u.addEventListener("click", function () {
        if (state.useful[r.id]) { delete state.useful[r.id]; } else {
          state.useful[r.id] = true;
          signal({ kind: "mark_useful", doc: r.id, rank: r.rank });
        }
        run();
      });
      li.appendChild(u);
      li.appendChild(marked(r.segments));
      res.appendChild(li);
    });
  }

  function run() {
    if (!state.q) { return; }
    el("status").textContent = "Searching\u2026";
    api("/api/v1/lookup", { q: state.q, accepted: state.accepted.map(function (a) { return a.term; }).join("|"),
      useful: Object.keys(state.useful).join("|") })
      .then(render)
      .catch(function (err) {
        // A query Kinword cannot search (only very common words, too long)
        // is the searcher's to fix: say why, not that something broke.
        var m = err.message || "";
        el("status").textContent = err.code === "bad_query" ? m.charAt(0).toUpperCase() + m.slice(1) : "Search failed: " + m;
      });
  }

  el("search").addEventListener("submit", function (e) {
    e.preventDefault();
    state.q = el("q").value.trim();
    state.accepted = []; state.dismissed = {}; state.useful = {};
    run();
  });

  // A shared link (?q=...&persona=...) runs its search on load.
  var params = new URLSearchParams(window.location.search);
  state.persona = params.get("persona") || "";
  if (params.get("q")) {
    el("q").value = params.get("q");
    state.q = el("q").value.trim();
    run();
  }

  api("/api/v1/whoami", {}).then(function (me) {
    if (!me.demo) { return; }
    var sel = el("persona");
    me.personas.forEach(function (p) {
      var o = text("option", p.label);
      o.value = p.department;
      sel.appendChild(o);
    });
    sel.value = state.persona;
    sel.addEventListener("change", function () { state.persona = sel.value; run(); });
    el("demo-banner").hidden = false;
  });
})();
