// Kinword related-terms widget for an existing intranet search page.
// Usage: <div data-kinword-for="ID-OF-SEARCH-INPUT"></div>
//        <script src="https://KINWORD-HOST/static/widget.js" defer></script>
// Clicking a term appends it to the input and submits the page's form.
(function () {
  "use strict";
  var me = document.currentScript;
  var base = me ? new URL(me.src).origin : window.location.origin;
  document.querySelectorAll("[data-kinword-for]").forEach(function (box) {
    var input = document.getElementById(box.getAttribute("data-kinword-for"));
    if (!input) { return; }
    box.setAttribute("role", "region");
    box.setAttribute("aria-label", "Related terms");
    var last = "";
    function show() {
      var q = input.value.trim();
      if (!q || q === last) { return; }
      last = q;
      fetch(base + "/api/v1/hints?q=" + encodeURIComponent(q), { credentials: "include" })
        .then(function (r) { return r.ok ? r.json() : { suggestions: [] }; })
        .then(function (resp) {
          box.textContent = "";
          resp.suggestions.forEach(function (s) {
            var b = document.createElement("button");
            b.type = "button";
            b.textContent = s.display;
            b.setAttribute("aria-label", "Add related term " + s.display);
            b.addEventListener("click", function () {
              input.value = input.value + " " + s.display;
              if (input.form) { input.form.requestSubmit(); }
            });
            box.appendChild(b);
          });
        })
        .catch(function () { box.textContent = ""; });
    }
    input.addEventListener("change", show);
    if (input.value) { show(); }
  });
})();
