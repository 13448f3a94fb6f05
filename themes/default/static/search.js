/* netfolio: the search box in every page's header. Searches the index the build writes
   (search-index.js, window.netfolioSearch); works opened from disk. Results are links, built
   with textContent, so no indexed text is ever read as markup. */
(function () {
  "use strict";

  var SHOWN = 12;

  function setup(box) {
    var entries = window.netfolioSearch;
    if (!entries) {
      return;
    }
    var root = box.getAttribute("data-root") || "";
    var input = box.querySelector("input");
    var list = box.querySelector("ul");
    var status = box.querySelector(".site-search-status");
    var haystacks = entries.map(function (entry) {
      return (entry[0] + " " + entry[1] + " " + entry[3]).toLocaleLowerCase();
    });
    box.hidden = false;

    function clear() {
      while (list.firstChild) {
        list.removeChild(list.firstChild);
      }
    }

    function run() {
      var query = input.value.trim().toLocaleLowerCase();
      clear();
      if (!query) {
        status.textContent = "";
        return;
      }
      var words = query.split(/\s+/);
      var found = [];
      entries.forEach(function (entry, index) {
        var hay = haystacks[index];
        for (var w = 0; w < words.length; w += 1) {
          if (hay.indexOf(words[w]) < 0) {
            return;
          }
        }
        var title = entry[0].toLocaleLowerCase();
        var rank = title === query ? 0 : title.indexOf(query) === 0 ? 1 :
          title.indexOf(query) > 0 ? 2 : 3;
        found.push([rank, index]);
      });
      found.sort(function (a, b) { return a[0] - b[0] || a[1] - b[1]; });
      found.slice(0, SHOWN).forEach(function (hit) {
        var entry = entries[hit[1]];
        var item = document.createElement("li");
        var link = document.createElement("a");
        link.href = root + entry[2];
        link.textContent = entry[0];
        var where = document.createElement("span");
        where.className = "site-search-where";
        where.textContent = entry[1];
        link.appendChild(where);
        item.appendChild(link);
        list.appendChild(item);
      });
      if (!found.length) {
        status.textContent = "Nothing found for \u201c" + input.value.trim() + "\u201d.";
      } else if (found.length > SHOWN) {
        status.textContent = "The first " + SHOWN + " of " + found.length +
          " results; type more to narrow them.";
      } else {
        status.textContent = found.length === 1 ? "1 result." : found.length + " results.";
      }
    }

    function links() {
      return Array.prototype.slice.call(list.querySelectorAll("a"));
    }

    input.addEventListener("input", run);
    input.addEventListener("keydown", function (event) {
      if (event.key === "ArrowDown" && links().length) {
        event.preventDefault();
        links()[0].focus();
      } else if (event.key === "Enter" && links().length) {
        event.preventDefault();
        links()[0].click();
      } else if (event.key === "Escape") {
        input.value = "";
        run();
      }
    });
    list.addEventListener("keydown", function (event) {
      var all = links();
      var at = all.indexOf(document.activeElement);
      if (event.key === "ArrowDown" && at < all.length - 1) {
        event.preventDefault();
        all[at + 1].focus();
      } else if (event.key === "ArrowUp") {
        event.preventDefault();
        (at > 0 ? all[at - 1] : input).focus();
      } else if (event.key === "Escape") {
        input.focus();
      }
    });
  }

  document.querySelectorAll(".site-search").forEach(setup);
}());
