// Small things every page does. Progressive enhancement: without this
// script the pages work as they are.
//
// 1. Text areas with a length limit (data-max-chars) show, as the person
//    types, how many characters are left, and past the limit how many
//    are over; the server refuses a longer text and keeps it in the box
//    to be shortened. (Not maxlength: a browser cuts a paste there
//    without a word.) Characters are counted as the server counts them,
//    in Unicode code points, a line break as one. The count describes the
//    text area; a screen reader is told only when the count falls below a
//    tenth of the limit, reaches none and goes over, not at every
//    keystroke.
// 2. A table or picture that is wider than the screen scrolls inside its
//    own box (the stylesheet does that); such a box becomes reachable by
//    keyboard and is named for screen readers after its caption or the
//    heading above it, so the scrolling is not for mouse users only.
//    The weight map, which opens at its right end on a phone, is marked
//    on its figure with the edges beyond which more of it lies
//    (data-more-left, data-more-right), or as fitting (data-fits); the
//    stylesheet draws a shadow at each such edge and hides the hint
//    above a map that fits. A map with a cut-off that leaves experts out
//    (data-show-cut) is moved once, so that its label is in view and as
//    much of the map right of it (the experts who earn weight) as fits.
// 3. A refused form comes back as a new page, shown from its top with the
//    focus on nothing: the facilitator's weights, agreed prior or round
//    form, a screen or more down the page, was out of sight, and the
//    keyboard started again from the masthead. The first field the page
//    marks takes the focus, its message read with it (aria-describedby),
//    and the field with its label and message is brought to the middle of
//    the screen. (The answer form's own script does the same for it.)
(function () {
  "use strict";
  var first = document.querySelector(".field-invalid input:not([type=hidden]), .field-invalid select, .field-invalid textarea");
  if (!first || typeof first.focus !== "function") { return; }
  var a = document.activeElement;
  if (a && a !== document.body) { return; }
  first.focus({ preventScroll: true });
  (first.closest(".field") || first).scrollIntoView({ block: "center" });
})();

(function () {
  "use strict";
  // count gives each field with a limit, not yet counted, its count of
  // characters left: at load, and in a part a live update put in (the
  // overview's Rounds card lost its count, and 22 px, on each change).
  function count() {
    Array.prototype.forEach.call(document.querySelectorAll("textarea[data-max-chars]:not([data-counted])"), counted);
  }
  function counted(ta) {
    var max = parseInt(ta.getAttribute("data-max-chars"), 10);
    if (!max) { return; }
    ta.setAttribute("data-counted", "");
    var note = document.createElement("span");
    note.className = "text-count";
    note.id = ta.id + "-count";
    ta.insertAdjacentElement("afterend", note);
    var described = ta.getAttribute("aria-describedby");
    ta.setAttribute("aria-describedby", (described ? described + " " : "") + note.id);
    var told = document.createElement("span");
    told.className = "visually-hidden";
    told.setAttribute("aria-live", "polite");
    note.insertAdjacentElement("afterend", told);
    var zone = "";
    function show() {
      var left = max - Array.from(ta.value).length;
      var over = left < 0;
      note.textContent = over ? (-left) + (left === -1 ? " character" : " characters") + " over the limit of " + max + ": please shorten it before saving" : left + " of " + max + " characters left";
      var near = !over && left < max / 10;
      note.classList.toggle("text-count-near", near);
      note.classList.toggle("text-count-over", over);
      var now = over ? "over" : left === 0 ? "none" : near ? "near" : "";
      if (now !== zone) {
        told.textContent = now === "over" ? "Over the limit of " + max + " characters: please shorten it before saving." : now === "none" ? "No characters left: the limit is " + max + "." : now === "near" ? left + " of " + max + " characters left." : "";
        zone = now;
      }
    }
    ta.addEventListener("input", show);
    show();
  }
  count();
  document.addEventListener("parley:live", count);

  function nameOf(box) {
    var cap = box.querySelector("caption");
    if (cap && cap.textContent.trim()) { return cap.textContent.trim(); }
    var section = box.closest("section, .card, figure");
    var h = section && section.querySelector("h1, h2, h3");
    return h ? h.textContent.trim() : "Scrollable content";
  }
  function markScrollers() {
    Array.prototype.forEach.call(document.querySelectorAll(".table, .chart-table, .table-scroll, .map-scroll, .chart"), function (box) {
      var scrolls = box.scrollWidth > box.clientWidth + 1 && getComputedStyle(box).overflowX !== "visible";
      if (scrolls && !box.hasAttribute("tabindex")) {
        box.setAttribute("tabindex", "0");
        box.setAttribute("data-scroll-focus", "");
        if (!box.hasAttribute("aria-label") && box.tagName !== "TABLE") {
          box.setAttribute("role", "region");
          box.setAttribute("aria-label", nameOf(box) + " (scrolls sideways)");
        }
      } else if (!scrolls && box.hasAttribute("data-scroll-focus")) {
        box.removeAttribute("tabindex");
        box.removeAttribute("data-scroll-focus");
      }
    });
  }
  // The edges are read from where the picture stands against its box, so
  // a box laid out right to left reads as one laid out left to right.
  function markEdges(box) {
    var figure = box.closest(".chart-weight-map"), inner = box.firstElementChild;
    if (!figure || !inner) { return; }
    var b = box.getBoundingClientRect(), c = inner.getBoundingClientRect();
    var left = c.left < b.left - 1, right = c.right > b.right + 1;
    figure.toggleAttribute("data-more-left", left);
    figure.toggleAttribute("data-more-right", right);
    figure.toggleAttribute("data-fits", !left && !right);
  }
  // showCut brings the cut-off's label into view once, clear of the
  // shadow at the edge (1.1rem in chart.css), with as much of the map
  // right of it as the box holds.
  function showCut(box) {
    var label = box.querySelector(".map-cut-label");
    if (!box.hasAttribute("data-show-cut") || box.hasAttribute("data-placed") || !label || box.scrollWidth <= box.clientWidth + 1) { return; }
    box.setAttribute("data-placed", "");
    var edge = 1.1 * parseFloat(getComputedStyle(document.documentElement).fontSize);
    var b = box.getBoundingClientRect(), l = label.getBoundingClientRect();
    // Scrolled as far right as keeps the label whole, up to the map's
    // right end: the experts who earn weight stand right of the cut-off.
    var d = Math.min(l.left - (b.left + edge), box.firstElementChild.getBoundingClientRect().right - b.right);
    if (Math.abs(d) > 0.5) { box.scrollLeft += d; }
  }
  function markAll() {
    markScrollers();
    Array.prototype.forEach.call(document.querySelectorAll(".map-scroll"), function (box) {
      showCut(box);
      markEdges(box);
    });
  }
  markAll();
  window.addEventListener("resize", markAll);
  document.addEventListener("parley:live", markAll);
  // Scroll events do not bubble; caught on their way down, one listener
  // serves every map, also those a live update puts in.
  document.addEventListener("scroll", function (e) {
    if (e.target.classList && e.target.classList.contains("map-scroll")) { markEdges(e.target); }
  }, { capture: true, passive: true });
})();
