/* netfolio: sortable, filterable tables. Works from disk; reads only the page itself.
   A table opts in with the data-sortable attribute; a header cell with data-type="number"
   sorts by the exact value in each cell's data-value attribute. */
(function () {
  "use strict";

  var collator = new Intl.Collator(undefined, { numeric: true, sensitivity: "base" });

  function cellText(row, index) {
    var cell = row.cells[index];
    return cell ? cell.textContent.trim() : "";
  }

  function numberAt(row, index) {
    var cell = row.cells[index];
    var raw = cell ? cell.getAttribute("data-value") : null;
    if (raw === null || raw === "") {
      return null;
    }
    var value = Number(raw);
    return isNaN(value) ? null : value;
  }

  function compareRows(a, b, index, numeric, direction) {
    if (numeric) {
      var x = numberAt(a.row, index);
      var y = numberAt(b.row, index);
      // Missing values always sort last, whichever the direction.
      if (x === null || y === null) {
        if (x === null && y === null) {
          return a.position - b.position;
        }
        return x === null ? 1 : -1;
      }
      if (x !== y) {
        return direction * (x < y ? -1 : 1);
      }
      return a.position - b.position;
    }
    var s = cellText(a.row, index);
    var t = cellText(b.row, index);
    // Missing text (shown as an em dash) sorts last too.
    if ((s === "\u2014") !== (t === "\u2014")) {
      return s === "\u2014" ? 1 : -1;
    }
    var order = collator.compare(s, t);
    return order !== 0 ? direction * order : a.position - b.position;
  }

  function announce(tools, message) {
    var status = tools && tools.querySelector(".status");
    if (status) {
      status.textContent = message;
    }
  }

  function makeSortable(table, tools) {
    var headers = table.tHead ? table.tHead.rows[0].cells : [];
    var body = table.tBodies[0];
    var original = Array.prototype.map.call(body.rows, function (row, position) {
      return { row: row, position: position };
    });

    Array.prototype.forEach.call(headers, function (th, index) {
      var numeric = th.getAttribute("data-type") === "number";
      var label = th.textContent.trim();
      var button = document.createElement("button");
      button.type = "button";
      button.className = "sort";
      button.textContent = label;
      th.textContent = "";
      th.appendChild(button);

      button.addEventListener("click", function () {
        var current = th.getAttribute("aria-sort");
        // Numbers start high-to-low (the usual question is "who is highest"), text A-Z.
        var ascending = current ? current === "descending" : !numeric;
        var direction = ascending ? 1 : -1;
        Array.prototype.forEach.call(headers, function (other) {
          other.removeAttribute("aria-sort");
        });
        th.setAttribute("aria-sort", ascending ? "ascending" : "descending");
        var sorted = original.slice().sort(function (a, b) {
          return compareRows(a, b, index, numeric, direction);
        });
        var fragment = document.createDocumentFragment();
        sorted.forEach(function (item) {
          fragment.appendChild(item.row);
        });
        body.appendChild(fragment);
        announce(tools, "Sorted by " + label + ", " + (ascending ? "ascending" : "descending") + ".");
      });
    });
  }

  function makeFilterable(table, tools) {
    var input = tools.querySelector("input");
    if (!input) {
      return;
    }
    var rows = Array.prototype.slice.call(table.tBodies[0].rows);
    // Compare without case or accents, so "zoe" finds "Zoë".
    function plain(text) {
      return text.normalize("NFD").replace(/[\u0300-\u036f]/g, "").toLowerCase();
    }
    var texts = rows.map(function (row) {
      return plain(row.textContent);
    });
    input.addEventListener("input", function () {
      var query = plain(input.value.trim());
      var shown = 0;
      rows.forEach(function (row, i) {
        var match = query === "" || texts[i].indexOf(query) !== -1;
        row.hidden = !match;
        if (match) {
          shown += 1;
        }
      });
      announce(tools, query === "" ? "Showing all " + rows.length + " rows."
        : "Showing " + shown + " of " + rows.length + " rows.");
    });
  }

  function setUp() {
    var tables = document.querySelectorAll("table[data-sortable]");
    Array.prototype.forEach.call(tables, function (table) {
      if (!table.tBodies.length) {
        return;
      }
      var tools = document.querySelector('[data-table-tools="' + table.id + '"]');
      makeSortable(table, tools);
      if (tools) {
        makeFilterable(table, tools);
        tools.hidden = false;
      }
    });
  }

  if (document.readyState === "loading") {
    document.addEventListener("DOMContentLoaded", setUp);
  } else {
    setUp();
  }
})();
