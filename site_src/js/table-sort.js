/* Click a table heading to sort its rows; click again to reverse. Numbers sort as numbers
   (the leading number of a cell such as "27.5 lbf (122.3 N)"), everything else as text.
   Written for this site; no dependencies. */
(function () {
  "use strict";
  var NUMBER = /^[+\-]?\d+(?:\.\d+)?/;
  var DATE = /^\d{4}-\d{2}-\d{2}$/;

  function key(cell) {
    var text = (cell.textContent || "").trim();
    var match = DATE.test(text) ? null : NUMBER.exec(text);
    return match ? { n: parseFloat(match[0]), t: text } : { n: null, t: text.toLowerCase() };
  }

  function compare(a, b) {
    if (a.n !== null && b.n !== null) return a.n - b.n;
    if (a.n !== null) return -1;
    if (b.n !== null) return 1;
    return a.t < b.t ? -1 : a.t > b.t ? 1 : 0;
  }

  function sortBy(table, column, th) {
    var body = table.tBodies[0];
    if (!body) return;
    var descending = th.getAttribute("aria-sort") === "ascending";
    var rows = Array.prototype.slice.call(body.rows).map(function (row, index) {
      return { row: row, index: index, key: key(row.cells[column] || row) };
    });
    rows.sort(function (a, b) {
      var order = compare(a.key, b.key) || a.index - b.index;
      return descending ? -order : order;
    });
    rows.forEach(function (item) { body.appendChild(item.row); });
    Array.prototype.forEach.call(table.tHead.rows[0].cells, function (cell) {
      cell.removeAttribute("aria-sort");
    });
    th.setAttribute("aria-sort", descending ? "descending" : "ascending");
  }

  function setUp() {
    document.querySelectorAll(".md-typeset table:not([class])").forEach(function (table) {
      if (!table.tHead || table.dataset.sortable) return;
      table.dataset.sortable = "yes";
      Array.prototype.forEach.call(table.tHead.rows[0].cells, function (th, column) {
        th.setAttribute("title", "Sort by this column");
        th.addEventListener("click", function () { sortBy(table, column, th); });
      });
    });
  }

  if (document.readyState === "loading") document.addEventListener("DOMContentLoaded", setUp);
  else setUp();
})();
