// Kinword vocabulary desk: import a rule file (showing what was rejected)
// and export every rule. Loaded after librarian.js.
(function () {
  "use strict";
  var K = window.KW, el = K.el, text = K.text;

  // rejections finds the rejection list wherever the API put it.
  function rejections(b) {
    if (!b) { return []; }
    var cands = [b.rejected, b.report && b.report.rejected, b.error && b.error.rejected,
      b.error && b.error.report && b.error.report.rejected, b.error && b.error.details];
    for (var i = 0; i < cands.length; i++) { if (Array.isArray(cands[i])) { return cands[i]; } }
    return [];
  }

  function count(b) {
    var cands = [b.rules, b.imported, b.report && b.report.rules, b.count];
    for (var i = 0; i < cands.length; i++) {
      if (typeof cands[i] === "number") { return cands[i]; }
      if (Array.isArray(cands[i])) { return cands[i].length; }
    }
    return null;
  }

  function report(msg, rows, isError) {
    var box = el("import-report");
    box.textContent = "";
    box.appendChild(text("p", msg, isError ? "kw-note kw-error" : "kw-note"));
    if (!rows.length) { return; }
    var t = text("table", null, "kw-table");
    t.appendChild(text("caption", rows.length + (rows.length === 1 ? " rejected item" : " rejected items") +
      "; nothing was imported"));
    new K.Table(t, [
      { key: "line", label: "Line", num: true, value: function (r) { return r.line || ""; } },
      { key: "item", label: "Item" },
      { key: "reason", label: "Reason" }
    ]).set(rows);
    var wrap = text("div", null, "kw-table-wrap");
    wrap.appendChild(t);
    box.appendChild(wrap);
  }

  var TYPES = { csv: "text/csv", ntriples: "application/n-triples", jsonld: "application/ld+json" };

  el("import-form").addEventListener("submit", function (e) {
    e.preventDefault();
    var file = el("imp-file").files[0], format = el("imp-format").value;
    var mode = document.querySelector('input[name="imp-mode"]:checked').value;
    if (!file) { K.say("Choose a file to import.", true); el("imp-file").focus(); return; }
    if (mode === "replace" && !window.confirm("Replace every rule with the rules in " + file.name + "?")) { return; }
    K.say("Importing " + file.name + "\u2026");
    file.text().then(function (body) {
      return K.api("POST", "/api/v1/rules/import", { params: { format: format, mode: mode }, raw: body, type: TYPES[format] });
    }).then(function (b) {
      var n = count(b), rej = rejections(b);
      var msg = rej.length ? "Import refused." : "Imported " + (n === null ? "the" : n) + (n === 1 ? " rule" : " rules") +
        " from " + file.name + (mode === "replace" ? ", replacing the previous set." : ".");
      report(msg, rej, rej.length > 0);
      K.say(msg, rej.length > 0);
      if (window.KWLibrarian) { window.KWLibrarian.reload(); }
    }).catch(function (err) {
      var rej = rejections(err.body);
      report("Import refused: " + err.message, rej, true);
      K.say("Import refused: " + err.message, true);
    });
  });

  var ex = el("exports");
  [["CSV", "csv", "csv"], ["N-Triples (W3C SKOS)", "ntriples", "nt"], ["JSON-LD (W3C SKOS)", "jsonld", "jsonld"]].forEach(function (f) {
    ex.appendChild(K.exportLink(f[0], "/api/v1/rules/export", { format: f[1] }, "kinword-rules." + f[2]));
  });
})();
