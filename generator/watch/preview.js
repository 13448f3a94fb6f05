// netfolio watch: asks the preview server for the build state about once a second, reloads the
// page after each new build that succeeded, and shows the error of a failed one over the page.
// Served only by the preview, never written into the site.
(function () {
  "use strict";

  var marker = document.querySelector('meta[name="netfolio-preview-build"]');
  var servedAt = marker ? Number(marker.getAttribute("content")) : -1;
  var panel = null;
  var shownText = null;

  function paragraph(className, text) {
    var p = document.createElement("p");
    p.className = className;
    p.textContent = text;
    return p;
  }

  function hidePanel() {
    if (panel) {
      panel.remove();
      panel = null;
      shownText = null;
    }
  }

  function showPanel(error) {
    var text = error ? error.text : "the build failed";
    var more = error && error.count > 1 ? error.count - 1 : 0;
    var key = text + "|" + more;
    if (key === shownText || !document.body) {
      return;
    }
    hidePanel();
    panel = document.createElement("aside");
    panel.className = "netfolio-preview-panel";
    panel.setAttribute("role", "alert");
    panel.appendChild(paragraph("netfolio-preview-title", "The last build failed"));
    panel.appendChild(paragraph("netfolio-preview-error", text));
    if (more > 0) {
      panel.appendChild(paragraph("netfolio-preview-more",
        "and " + more + " more " + (more === 1 ? "error" : "errors") + " (netfolio check lists them all)"));
    }
    panel.appendChild(paragraph("netfolio-preview-hint",
      "This page shows the last site that built; it reloads by itself once the study builds again."));
    document.body.appendChild(panel);
    shownText = key;
  }

  function poll() {
    fetch("/.netfolio/state", { cache: "no-store" })
      .then(function (response) { return response.json(); })
      .then(function (state) {
        if (state.ok && state.build !== servedAt) {
          location.reload();
          return;
        }
        if (state.ok) {
          hidePanel();
        } else {
          showPanel(state.error);
        }
        setTimeout(poll, 1000);
      })
      .catch(function () {
        setTimeout(poll, 1000); // the preview is restarting or has stopped: keep asking
      });
  }

  poll();
})();
