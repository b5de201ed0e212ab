// Sorting for the summary table: click a heading to sort by that column,
// click again to reverse. The table reads the same without this script.
(function () {
  "use strict";
  var table = document.getElementById("summary");
  if (!table || !table.tHead || !table.tBodies.length) { return; }
  var heads = table.tHead.rows[0].cells;
  var body = table.tBodies[0];
  function key(row, col, numeric) {
    var cell = row.cells[col];
    var raw = cell.getAttribute("data-sort");
    if (raw === null) { raw = cell.textContent.trim(); }
    if (!numeric) { return raw.toLowerCase(); }
    var n = parseFloat(raw);
    return isNaN(n) ? -Infinity : n; // undefined figures sort below any number
  }
  function sortBy(col) {
    var head = heads[col];
    var numeric = head.getAttribute("data-type") === "num";
    var ascending = head.getAttribute("aria-sort") !== "ascending";
    var rows = Array.prototype.slice.call(body.rows);
    rows.sort(function (a, b) {
      var ka = key(a, col, numeric), kb = key(b, col, numeric);
      var order = ka < kb ? -1 : ka > kb ? 1 : 0;
      if (order === 0) { order = key(a, 0, true) - key(b, 0, true); }
      return ascending ? order : -order;
    });
    rows.forEach(function (row) { body.appendChild(row); });
    for (var i = 0; i < heads.length; i++) { heads[i].removeAttribute("aria-sort"); }
    head.setAttribute("aria-sort", ascending ? "ascending" : "descending");
  }
  Array.prototype.forEach.call(heads, function (head, col) {
    if (!head.getAttribute("data-type")) { return; }
    var button = document.createElement("button");
    button.type = "button";
    while (head.firstChild) { button.appendChild(head.firstChild); }
    head.appendChild(button);
    button.addEventListener("click", function () { sortBy(col); });
  });
}());
