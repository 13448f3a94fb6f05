/* netfolio: says when a table is wider than its box. A table that does not fit scrolls
   sideways inside its own box; a short line above it says so, and goes when the box is wide
   enough again. Screen readers skip the line: the box is a labelled, focusable region. */
(function () {
  "use strict";

  function update(box) {
    var hint = box.previousElementSibling;
    var has = hint && hint.classList.contains("scroll-hint");
    var wide = box.scrollWidth > box.clientWidth + 1;
    if (wide && !has) {
      hint = document.createElement("p");
      hint.className = "scroll-hint";
      hint.setAttribute("aria-hidden", "true");
      hint.textContent = "Wider than the screen: scroll the table sideways for more columns.";
      box.parentNode.insertBefore(hint, box);
    } else if (!wide && has) {
      hint.parentNode.removeChild(hint);
    }
  }

  function updateAll() {
    Array.prototype.forEach.call(document.querySelectorAll(".table-scroll"), update);
  }

  function setUp() {
    updateAll();
    var pending = null;
    window.addEventListener("resize", function () {
      window.clearTimeout(pending);
      pending = window.setTimeout(updateAll, 150);
    });
  }

  if (document.readyState === "loading") {
    document.addEventListener("DOMContentLoaded", setUp);
  } else {
    setUp();
  }
})();
