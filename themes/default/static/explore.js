/* netfolio: the explorable network map. Reads the data file the build writes beside each
   network page (window.netfolioMaps[id]); needs nothing else, so it works opened from disk.
   Every text from the data goes in through textContent or an attribute, never as markup. */
(function () {
  "use strict";

  var SVG = "http://www.w3.org/2000/svg";
  var MIN_SCALE = 0.8;
  var MAX_SCALE = 16;
  var LABEL_PX = 13; // label text height on screen, whatever the zoom
  var ARROW_PX = 8; // arrowhead length on screen

  function svgElement(name, attributes) {
    var element = document.createElementNS(SVG, name);
    Object.keys(attributes || {}).forEach(function (key) {
      element.setAttribute(key, attributes[key]);
    });
    return element;
  }

  function htmlElement(name, text, className) {
    var element = document.createElement(name);
    if (text !== undefined && text !== null) {
      element.textContent = text;
    }
    if (className) {
      element.className = className;
    }
    return element;
  }

  function swatch(colour) {
    var icon = svgElement("svg", { width: "14", height: "14", viewBox: "0 0 14 14",
                                   "aria-hidden": "true", focusable: "false" });
    icon.appendChild(svgElement("circle", { cx: "7", cy: "7", r: "6", fill: colour,
                                            class: "explorer-swatch" }));
    return icon;
  }

  function Explorer(section, data) {
    this.section = section;
    this.data = data;
    this.n = data.ids.length;
    this.scale = 1;
    this.tx = 0;
    this.ty = 0;
    this.focus = -1;
    this.pinned = false;
    this.pointers = {};
    this.moved = false;
    this.frame = 0;
    this.ties = { out: [], in: [] };
    for (var i = 0; i < this.n; i += 1) {
      this.ties.out.push([]);
      this.ties.in.push([]);
    }
    var self = this;
    data.ties.forEach(function (tie, index) {
      self.ties.out[tie[0]].push(index);
      self.ties.in[tie[1]].push(index);
    });
    this.build();
    this.bind();
    this.colourBy(0);
    this.apply();
  }

  Explorer.prototype.build = function () {
    var data = this.data;
    var stage = this.section.querySelector(".explorer-stage");
    this.stage = stage;
    this.svg = svgElement("svg", {
      viewBox: "0 0 " + data.width + " " + data.height, class: "explorer-svg",
      role: "img", "aria-label": stage.getAttribute("data-label") || "Network map"
    });
    this.view = svgElement("g", { class: "explorer-view" });
    this.tieLayer = svgElement("g", { class: "explorer-ties" });
    this.headLayer = svgElement("g", { class: "explorer-heads" });
    this.nodeLayer = svgElement("g", { class: "explorer-nodes" });
    this.labelLayer = svgElement("g", { class: "explorer-labels" });
    this.lines = [];
    this.heads = [];
    this.circles = [];
    var i;
    for (i = 0; i < data.ties.length; i += 1) {
      var tie = data.ties[i];
      var line = svgElement("line", {
        x1: data.x[tie[0]], y1: data.y[tie[0]], x2: data.x[tie[1]], y2: data.y[tie[1]],
        "stroke-width": Math.max(tie[2], 0.6), "vector-effect": "non-scaling-stroke",
        class: "explorer-tie"
      });
      this.lines.push(line);
      this.tieLayer.appendChild(line);
      if (data.directed) {
        var head = svgElement("path", { class: "explorer-head" });
        this.heads.push(head);
        this.headLayer.appendChild(head);
      }
    }
    for (i = 0; i < this.n; i += 1) {
      var circle = svgElement("circle", {
        cx: data.x[i], cy: data.y[i], r: data.r[i], class: "explorer-node",
        "vector-effect": "non-scaling-stroke", "data-index": String(i)
      });
      var title = svgElement("title");
      title.textContent = data.labels[i];
      circle.appendChild(title);
      this.circles.push(circle);
      this.nodeLayer.appendChild(circle);
    }
    this.view.appendChild(this.tieLayer);
    this.view.appendChild(this.headLayer);
    this.view.appendChild(this.nodeLayer);
    this.view.appendChild(this.labelLayer);
    this.svg.appendChild(this.view);
    stage.appendChild(this.svg);

    this.details = this.section.querySelector(".explorer-details");
    this.keyList = this.section.querySelector(".explorer-key ul");
    this.status = this.section.querySelector(".explorer-find .status");
    this.find = this.section.querySelector(".explorer-find input");
    var names = this.section.querySelector(".explorer-find datalist");
    var seen = {};
    for (i = 0; i < this.n; i += 1) {
      if (!seen[data.labels[i]]) {
        seen[data.labels[i]] = true;
        var option = document.createElement("option");
        option.value = data.labels[i];
        names.appendChild(option);
      }
    }
    this.select = this.section.querySelector(".explorer-colour select");
    data.colourings.forEach(function (colouring, index) {
      var option = document.createElement("option");
      option.value = String(index);
      option.textContent = colouring.title;
      this.select.appendChild(option);
    }, this);
    this.section.querySelector(".explorer-size").textContent = data.sizeTitle;
  };

  Explorer.prototype.bind = function () {
    var self = this;
    var svg = this.svg;
    svg.addEventListener("wheel", function (event) {
      event.preventDefault();
      var point = self.toView(event.clientX, event.clientY);
      self.zoomAt(Math.exp(-event.deltaY * 0.0015), point.x, point.y);
    }, { passive: false });
    svg.addEventListener("pointerdown", function (event) {
      self.pointers[event.pointerId] = { x: event.clientX, y: event.clientY };
      self.moved = false;
      svg.setPointerCapture(event.pointerId);
    });
    svg.addEventListener("pointermove", function (event) {
      var last = self.pointers[event.pointerId];
      if (!last) {
        return;
      }
      var ids = Object.keys(self.pointers);
      var before = self.toView(last.x, last.y);
      var now = self.toView(event.clientX, event.clientY);
      if (Math.abs(event.clientX - last.x) + Math.abs(event.clientY - last.y) > 3) {
        self.moved = true;
      }
      if (ids.length === 2) {
        var other = self.pointers[ids[0] === String(event.pointerId) ? ids[1] : ids[0]];
        var from = Math.hypot(last.x - other.x, last.y - other.y);
        var to = Math.hypot(event.clientX - other.x, event.clientY - other.y);
        var middle = self.toView((event.clientX + other.x) / 2, (event.clientY + other.y) / 2);
        if (from > 0) {
          self.zoomAt(to / from, middle.x, middle.y);
        }
      } else if (ids.length === 1 && self.moved) {
        self.tx += (now.x - before.x) * self.scale;
        self.ty += (now.y - before.y) * self.scale;
        self.schedule();
      }
      self.pointers[event.pointerId] = { x: event.clientX, y: event.clientY };
    });
    function release(event) {
      delete self.pointers[event.pointerId];
    }
    svg.addEventListener("pointerup", release);
    svg.addEventListener("pointercancel", release);
    svg.addEventListener("click", function (event) {
      if (self.moved) {
        return;
      }
      var index = self.nodeAt(event.target);
      if (index >= 0) {
        self.show(index, true);
      } else {
        self.clear();
      }
    });
    svg.addEventListener("pointerover", function (event) {
      var index = self.nodeAt(event.target);
      if (index >= 0 && !self.pinned && event.pointerType !== "touch") {
        self.show(index, false);
      }
    });
    svg.addEventListener("pointerout", function (event) {
      if (self.nodeAt(event.target) >= 0 && !self.pinned) {
        self.clear();
      }
    });
    this.stage.addEventListener("keydown", function (event) {
      var step = 60 / self.scale;
      var handled = true;
      if (event.key === "+" || event.key === "=") {
        self.zoomAt(1.4, self.centre().x, self.centre().y);
      } else if (event.key === "-" || event.key === "_") {
        self.zoomAt(1 / 1.4, self.centre().x, self.centre().y);
      } else if (event.key === "0") {
        self.reset();
      } else if (event.key === "ArrowLeft") {
        self.pan(step, 0);
      } else if (event.key === "ArrowRight") {
        self.pan(-step, 0);
      } else if (event.key === "ArrowUp") {
        self.pan(0, step);
      } else if (event.key === "ArrowDown") {
        self.pan(0, -step);
      } else if (event.key === "Escape") {
        self.clear();
      } else {
        handled = false;
      }
      if (handled) {
        event.preventDefault();
      }
    });
    this.section.querySelectorAll("[data-zoom]").forEach(function (button) {
      button.addEventListener("click", function () {
        var how = button.getAttribute("data-zoom");
        if (how === "reset") {
          self.reset();
        } else {
          self.zoomAt(how === "in" ? 1.4 : 1 / 1.4, self.centre().x, self.centre().y);
        }
      });
    });
    this.select.addEventListener("change", function () {
      self.colourBy(Number(self.select.value));
    });
    this.find.addEventListener("change", function () {
      self.search(self.find.value);
    });
    this.find.addEventListener("keydown", function (event) {
      if (event.key === "Enter") {
        event.preventDefault();
        self.search(self.find.value);
      }
    });
    window.addEventListener("resize", function () {
      self.schedule();
    });
  };

  Explorer.prototype.nodeAt = function (target) {
    var node = target && target.closest ? target.closest(".explorer-node") : null;
    return node ? Number(node.getAttribute("data-index")) : -1;
  };

  Explorer.prototype.toView = function (clientX, clientY) {
    // Screen point -> map coordinates before the pan and zoom (the svg's own user space).
    var box = this.svg.getBoundingClientRect();
    var unit = box.width / this.data.width || 1;
    return { x: (clientX - box.left) / unit, y: (clientY - box.top) / unit };
  };

  Explorer.prototype.centre = function () {
    return { x: this.data.width / 2, y: this.data.height / 2 };
  };

  Explorer.prototype.zoomAt = function (factor, x, y) {
    var scale = Math.min(MAX_SCALE, Math.max(MIN_SCALE, this.scale * factor));
    var applied = scale / this.scale;
    this.tx = x - (x - this.tx) * applied;
    this.ty = y - (y - this.ty) * applied;
    this.scale = scale;
    this.schedule();
  };

  Explorer.prototype.pan = function (dx, dy) {
    this.tx += dx * this.scale;
    this.ty += dy * this.scale;
    this.schedule();
  };

  Explorer.prototype.reset = function () {
    this.scale = 1;
    this.tx = 0;
    this.ty = 0;
    this.schedule();
  };

  Explorer.prototype.centreOn = function (index) {
    var scale = Math.max(this.scale, 2.5);
    this.scale = Math.min(scale, MAX_SCALE);
    this.tx = this.data.width / 2 - this.data.x[index] * this.scale;
    this.ty = this.data.height / 2 - this.data.y[index] * this.scale;
    this.schedule();
  };

  Explorer.prototype.schedule = function () {
    var self = this;
    if (this.frame) {
      return;
    }
    this.frame = window.requestAnimationFrame(function () {
      self.frame = 0;
      self.apply();
    });
  };

  Explorer.prototype.apply = function () {
    // Nodes grow more slowly than the zoom, so crowded nodes come apart as one zooms in;
    // labels and arrowheads keep their size on screen.
    var data = this.data;
    this.view.setAttribute("transform", "translate(" + this.tx.toFixed(2) + " " +
                           this.ty.toFixed(2) + ") scale(" + this.scale.toFixed(4) + ")");
    this.section.setAttribute("data-scale", this.scale.toFixed(3));
    var grow = 1 / Math.sqrt(this.scale);
    var i;
    for (i = 0; i < this.n; i += 1) {
      this.circles[i].setAttribute("r", (data.r[i] * grow).toFixed(2));
    }
    var box = this.svg.getBoundingClientRect();
    var unit = (box.width / data.width || 1) * this.scale; // screen px per map unit
    this.unit = unit;
    if (data.directed) {
      var length = ARROW_PX / unit;
      for (i = 0; i < data.ties.length; i += 1) {
        var tie = data.ties[i];
        var x0 = data.x[tie[0]];
        var y0 = data.y[tie[0]];
        var x1 = data.x[tie[1]];
        var y1 = data.y[tie[1]];
        var distance = Math.hypot(x1 - x0, y1 - y0);
        var rim = data.r[tie[1]] * grow + 1 / unit;
        if (distance <= rim + length) {
          this.heads[i].setAttribute("d", "");
          continue;
        }
        var ux = (x1 - x0) / distance;
        var uy = (y1 - y0) / distance;
        var tipX = x1 - ux * rim;
        var tipY = y1 - uy * rim;
        var baseX = tipX - ux * length;
        var baseY = tipY - uy * length;
        var half = length * 0.4;
        this.heads[i].setAttribute("d", "M" + tipX.toFixed(2) + " " + tipY.toFixed(2) +
          "L" + (baseX - uy * half).toFixed(2) + " " + (baseY + ux * half).toFixed(2) +
          "L" + (baseX + uy * half).toFixed(2) + " " + (baseY - ux * half).toFixed(2) + "Z");
      }
    }
    this.drawLabels();
  };

  Explorer.prototype.colourBy = function (choice) {
    var colouring = this.data.colourings[choice];
    for (var i = 0; i < this.n; i += 1) {
      this.circles[i].setAttribute("fill", colouring.colours[i]);
    }
    this.select.value = String(choice);
    this.section.querySelector(".explorer-key-title").textContent = colouring.title;
    var list = this.keyList;
    while (list.firstChild) {
      list.removeChild(list.firstChild);
    }
    colouring.key.forEach(function (entry) {
      var item = document.createElement("li");
      item.appendChild(swatch(entry[1]));
      item.appendChild(htmlElement("span", entry[0]));
      item.appendChild(htmlElement("span", "(" + entry[2] + ")", "explorer-count"));
      list.appendChild(item);
    });
    // A key of hundreds of communities scrolls in its own box: reachable by keyboard then.
    if (list.scrollHeight > list.clientHeight) {
      list.tabIndex = 0;
      list.setAttribute("aria-label", "Key: " + colouring.title);
    } else {
      list.removeAttribute("tabindex");
      list.removeAttribute("aria-label");
    }
  };

  Explorer.prototype.neighbours = function (index) {
    var found = {};
    var data = this.data;
    this.ties.out[index].forEach(function (t) { found[data.ties[t][1]] = true; });
    this.ties.in[index].forEach(function (t) { found[data.ties[t][0]] = true; });
    delete found[index];
    return Object.keys(found).map(Number);
  };

  Explorer.prototype.show = function (index, pin) {
    this.clearMarks();
    this.focus = index;
    this.pinned = pin;
    this.svg.classList.add("has-focus");
    this.circles[index].classList.add("is-focus");
    var self = this;
    this.neighbours(index).forEach(function (j) {
      self.circles[j].classList.add("is-neighbour");
    });
    this.ties.out[index].concat(this.ties.in[index]).forEach(function (t) {
      self.lines[t].classList.add("is-near");
      if (self.heads.length) {
        self.heads[t].classList.add("is-near");
      }
    });
    // The focused node is drawn last, above its neighbours.
    this.nodeLayer.appendChild(this.circles[index]);
    this.drawLabels();
    this.describe(index);
  };

  Explorer.prototype.clearMarks = function () {
    this.svg.classList.remove("has-focus");
    this.svg.querySelectorAll(".is-focus, .is-neighbour, .is-near").forEach(function (el) {
      el.classList.remove("is-focus", "is-neighbour", "is-near");
    });
  };

  Explorer.prototype.clear = function () {
    this.clearMarks();
    this.focus = -1;
    this.pinned = false;
    this.drawLabels();
    this.describe(-1);
  };

  Explorer.prototype.drawLabels = function () {
    var layer = this.labelLayer;
    while (layer.firstChild) {
      layer.removeChild(layer.firstChild);
    }
    if (this.focus < 0) {
      return;
    }
    var data = this.data;
    var size = LABEL_PX / (this.unit || 1);
    var grow = 1 / Math.sqrt(this.scale);
    var shown = [this.focus].concat(this.neighbours(this.focus).slice(0, 40));
    shown.forEach(function (i, position) {
      var text = svgElement("text", {
        x: (data.x[i] + data.r[i] * grow + size * 0.3).toFixed(2),
        y: (data.y[i] + size * 0.35).toFixed(2),
        "font-size": size.toFixed(3),
        class: position === 0 ? "explorer-label is-focus" : "explorer-label"
      });
      text.textContent = data.labels[i];
      layer.appendChild(text);
    });
  };

  Explorer.prototype.tieList = function (title, ties, other) {
    var data = this.data;
    var block = document.createElement("div");
    block.appendChild(htmlElement("h4", title + " (" + ties.length + ")"));
    if (!ties.length) {
      return block;
    }
    var list = document.createElement("ul");
    list.className = "explorer-tie-list";
    ties.slice(0, 50).forEach(function (t) {
      var tie = data.ties[t];
      var item = htmlElement("li", data.labels[other(tie)]);
      if (tie[3]) {
        item.appendChild(htmlElement("span", "weight " + tie[3], "explorer-weight"));
      }
      list.appendChild(item);
    });
    if (ties.length > 50) {
      list.appendChild(htmlElement("li", "and " + (ties.length - 50) + " more"));
    }
    block.appendChild(list);
    return block;
  };

  Explorer.prototype.describe = function (index) {
    var box = this.details;
    var data = this.data;
    while (box.firstChild) {
      box.removeChild(box.firstChild);
    }
    if (index < 0) {
      box.appendChild(htmlElement("p", "Point at a node, select it, or find it by name to see " +
                                  "its ties and measures here.", "hint"));
      return;
    }
    box.appendChild(htmlElement("h3", data.labels[index]));
    var facts = document.createElement("dl");
    data.facts.forEach(function (fact) {
      facts.appendChild(htmlElement("dt", fact.title));
      facts.appendChild(htmlElement("dd", fact.values[index]));
    });
    box.appendChild(facts);
    if (data.directed) {
      box.appendChild(this.tieList("Ties out", this.ties.out[index], function (tie) {
        return tie[1];
      }));
      box.appendChild(this.tieList("Ties in", this.ties.in[index], function (tie) {
        return tie[0];
      }));
    } else {
      box.appendChild(this.tieList("Ties", this.ties.out[index].concat(this.ties.in[index]),
                                   function (tie) { return tie[0] === index ? tie[1] : tie[0]; }));
    }
    if (data.level === "community") {
      // A community, not a person: the counts are of its members and of ties, and the
      // communities page (when the site has one) lists who is in it.
      box.appendChild(htmlElement("p", "A group found in the measured ties; its members are " +
                                  "listed in the node table, by community.", "hint"));
      return;
    }
    var line = document.createElement("p");
    var views = this.section.getAttribute("data-views");
    if (views) {
      var page = htmlElement("a", "Its own page");
      page.href = views + data.anchors[index] + ".html";
      line.appendChild(page);
      line.appendChild(document.createTextNode(" \u00b7 "));
    }
    var link = htmlElement("a", "Its row in the node table");
    link.href = this.section.getAttribute("data-nodes") + "#" + data.anchors[index];
    line.appendChild(link);
    box.appendChild(line);
    box.appendChild(htmlElement("p", "A position in the measured network, not a judgement " +
                                "of the person.", "hint"));
  };

  Explorer.prototype.search = function (query) {
    var wanted = query.trim().toLocaleLowerCase();
    // Enter, then leaving the field, both ask: the second must not redo the first (it would
    // rebuild the panel under a click on its link).
    if (!wanted || wanted === this.lastSearch) {
      return;
    }
    this.lastSearch = wanted;
    var data = this.data;
    var found = -1;
    var i;
    for (i = 0; i < this.n && found < 0; i += 1) {
      if (data.labels[i].toLocaleLowerCase() === wanted ||
          data.ids[i].toLocaleLowerCase() === wanted) {
        found = i;
      }
    }
    for (i = 0; i < this.n && found < 0; i += 1) {
      if (data.labels[i].toLocaleLowerCase().indexOf(wanted) >= 0) {
        found = i;
      }
    }
    if (found < 0) {
      this.status.textContent = "No node matches \u201c" + query.trim() + "\u201d.";
      return;
    }
    this.status.textContent = "Found " + data.labels[found] + ".";
    this.centreOn(found);
    this.show(found, true);
  };

  document.querySelectorAll("[data-explorer]").forEach(function (section) {
    var data = (window.netfolioMaps || {})[section.getAttribute("data-explorer")];
    if (!data) {
      return;
    }
    section.hidden = false;
    section.explorer = new Explorer(section, data);
  });
}());
