// Kinword desks (librarian and admin pages): shared helpers. Plain script,
// no build step; exposes one global, KW. The pages hold no data of their
// own: every call below goes to the API, which checks the caller's role.
(function () {
  "use strict";
  var TOKEN_KEY = "kinword.token";

  function el(id) { return document.getElementById(id); }

  function text(tag, s, cls) {
    var n = document.createElement(tag);
    if (s !== undefined && s !== null) { n.textContent = String(s); }
    if (cls) { n.className = cls; }
    return n;
  }

  function button(label, cls, onClick, aria) {
    var b = text("button", label, "kw-btn " + (cls || ""));
    b.type = "button";
    if (aria) { b.setAttribute("aria-label", aria); }
    b.addEventListener("click", onClick);
    return b;
  }

  // norm gives every object key one spelling, lower case without
  // underscores, so "DismissRate" and "dismiss_rate" both read as
  // "dismissrate" whichever way the API encodes its structs.
  function norm(v) {
    if (Array.isArray(v)) { return v.map(norm); }
    if (v && typeof v === "object") {
      var o = {};
      Object.keys(v).forEach(function (k) { o[k.toLowerCase().replace(/_/g, "")] = norm(v[k]); });
      return o;
    }
    return v;
  }

  function token() {
    try { return window.sessionStorage.getItem(TOKEN_KEY) || ""; } catch (e) { return ""; }
  }

  function headers(extra) {
    var h = { "Accept": "application/json" };
    var t = token();
    if (t) { h.Authorization = "Bearer " + t; }
    Object.keys(extra || {}).forEach(function (k) { h[k] = extra[k]; });
    return h;
  }

  function url(path, params) {
    var u = new URL(path, window.location.origin);
    Object.keys(params || {}).forEach(function (k) {
      if (params[k] !== undefined && params[k] !== null && params[k] !== "") { u.searchParams.set(k, params[k]); }
    });
    return u;
  }

  // api calls the JSON API. opts: params (query), body (JSON-encoded),
  // raw (a Blob or string sent as is, with opts.type). It resolves to the
  // normalised body; it rejects with an Error carrying status, code and the
  // normalised body.
  function api(method, path, opts) {
    opts = opts || {};
    var init = { method: method, headers: headers() };
    if (opts.body !== undefined) {
      init.headers["Content-Type"] = "application/json";
      init.body = JSON.stringify(opts.body);
    } else if (opts.raw !== undefined) {
      init.headers["Content-Type"] = opts.type || "application/octet-stream";
      init.body = opts.raw;
    }
    return fetch(url(path, opts.params), init).then(function (r) {
      return r.text().then(function (s) {
        var body = {};
        if (s) { try { body = norm(JSON.parse(s)); } catch (e) { body = { message: s }; } }
        if (!r.ok) {
          var msg = (body.error && body.error.message) || body.message || r.statusText;
          if (r.status === 401 || r.status === 403) {
            msg += " (paste a token under Access)";
            if (el("access")) { el("access").open = true; }
          }
          var err = new Error(msg);
          err.status = r.status;
          err.code = body.error && body.error.code;
          err.body = body;
          throw err;
        }
        return body;
      });
    });
  }

  // say announces the result of an action in the page's live region.
  function say(msg, isError) {
    var live = el("live");
    if (!live) { return; }
    live.textContent = msg;
    live.className = "kw-status" + (isError ? " kw-error" : "");
  }

  // exportLink is a plain link that works without a token (demo mode);
  // with a token set, a click fetches the file with the header and saves it.
  function exportLink(label, path, params, filename) {
    var a = text("a", label);
    a.href = url(path, params).toString();
    a.addEventListener("click", function (e) {
      if (!token()) { return; }
      e.preventDefault();
      fetch(a.href, { headers: headers({ Accept: "*/*" }) }).then(function (r) {
        if (!r.ok) { throw new Error("export failed: " + r.status + " " + r.statusText); }
        return r.blob();
      }).then(function (b) {
        var tmp = document.createElement("a");
        tmp.href = URL.createObjectURL(b);
        tmp.download = filename;
        document.body.appendChild(tmp);
        tmp.click();
        tmp.remove();
        say("Saved " + filename + ".");
      }).catch(function (err) { say(err.message, true); });
    });
    return a;
  }

  // access wires the token field: kept in sessionStorage (this tab only).
  function access(onChange) {
    var input = el("token"), form = el("access-form"), forget = el("token-forget");
    if (!input || !form) { return; }
    input.value = token();
    form.addEventListener("submit", function (e) {
      e.preventDefault();
      try { window.sessionStorage.setItem(TOKEN_KEY, input.value.trim()); } catch (x) { /* storage off */ }
      say(input.value.trim() ? "Token kept for this tab." : "No token: only demo-mode loopback access works.");
      if (onChange) { onChange(); }
    });
    forget.addEventListener("click", function () {
      try { window.sessionStorage.removeItem(TOKEN_KEY); } catch (x) { /* storage off */ }
      input.value = "";
      say("Token forgotten.");
      if (onChange) { onChange(); }
    });
  }

  function compare(a, b) {
    if (typeof a === "number" && typeof b === "number") { return a - b; }
    return String(a === undefined || a === null ? "" : a).localeCompare(String(b === undefined || b === null ? "" : b));
  }

  // Table renders rows into a <table> whose <thead> it builds from cols:
  // [{key, label, num, sortable, cell(row) -> Node|string, value(row)}].
  // Sortable headers are buttons; aria-sort tells the current order.
  // limit (optional) caps the rows shown until "Show all" is pressed.
  function Table(tableEl, cols, empty, limit) {
    this.t = tableEl; this.cols = cols; this.rows = []; this.key = null; this.dir = 1; this.empty = empty || "Nothing to show.";
    this.limit = limit || 0; this.all = false;
    var tr = document.createElement("tr"), self = this;
    cols.forEach(function (c) {
      var th = document.createElement("th");
      th.scope = "col";
      if (c.num) { th.className = "kw-num"; }
      if (c.sortable === false) { th.textContent = c.label; } else {
        th.setAttribute("aria-sort", "none");
        var b = text("button", c.label, "kw-sort");
        b.type = "button";
        b.addEventListener("click", function () { self.sort(c.key); });
        th.appendChild(b);
      }
      c.th = th;
      tr.appendChild(th);
    });
    var head = tableEl.querySelector("thead") || tableEl.createTHead();
    head.textContent = "";
    head.appendChild(tr);
    this.body = tableEl.querySelector("tbody") || tableEl.createTBody();
  }
  Table.prototype.value = function (c, r) { return c.value ? c.value(r) : r[c.key]; };
  Table.prototype.sort = function (key) {
    this.dir = this.key === key ? -this.dir : 1;
    this.key = key;
    var self = this;
    this.cols.forEach(function (c) {
      if (c.th.hasAttribute("aria-sort")) {
        c.th.setAttribute("aria-sort", c.key === key ? (self.dir > 0 ? "ascending" : "descending") : "none");
      }
    });
    this.render();
  };
  Table.prototype.set = function (rows) { this.rows = rows.slice(); this.all = false; this.render(); };
  Table.prototype.render = function () {
    var self = this, rows = this.rows.slice();
    if (this.key) {
      var col = this.cols.filter(function (c) { return c.key === self.key; })[0];
      rows.sort(function (a, b) { return self.dir * compare(self.value(col, a), self.value(col, b)); });
    }
    this.body.textContent = "";
    if (!rows.length) {
      var tr0 = document.createElement("tr"), td0 = text("td", this.empty, "kw-muted");
      td0.colSpan = this.cols.length;
      tr0.appendChild(td0);
      this.body.appendChild(tr0);
      return;
    }
    var total = rows.length;
    if (this.limit && !this.all && total > this.limit) { rows = rows.slice(0, this.limit); }
    rows.forEach(function (r) {
      var tr = document.createElement("tr");
      self.cols.forEach(function (c) {
        var td = document.createElement("td");
        if (c.num) { td.className = "kw-num"; }
        var v = c.cell ? c.cell(r) : self.value(c, r);
        if (v instanceof Node) { td.appendChild(v); } else { td.textContent = v === undefined || v === null ? "" : String(v); }
        tr.appendChild(td);
      });
      self.body.appendChild(tr);
    });
    if (rows.length < total) {
      var more = document.createElement("tr"), td = document.createElement("td");
      td.colSpan = this.cols.length;
      td.appendChild(button("Show all " + total + " rows", "kw-quiet kw-small kw-more", function () {
        self.all = true; self.render();
        var first = self.body.rows[rows.length];
        if (first) { first.setAttribute("tabindex", "-1"); first.focus(); }
        say("Showing all " + total + " rows.");
      }));
      more.appendChild(td);
      this.body.appendChild(more);
    }
  };

  function pct(x) { return typeof x === "number" && isFinite(x) ? (100 * x).toFixed(1) + "%" : "\u2013"; }
  function day(s) { return s && String(s).slice(0, 4) !== "0001" ? String(s).slice(0, 10) : ""; }

  window.KW = { el: el, text: text, button: button, norm: norm, api: api, say: say, url: url,
    exportLink: exportLink, access: access, Table: Table, pct: pct, day: day, token: token };
})();
