// The room view's keys: the arrow keys, Page Up and Page Down (what a
// presentation clicker sends) and n/p move to the next or previous
// question's room view. The links are there without script too.
(function () {
  "use strict";
  document.addEventListener("keydown", function (ev) {
    if (ev.altKey || ev.ctrlKey || ev.metaKey || ev.shiftKey) { return; }
    var t = ev.target;
    if (t && (t.tagName === "INPUT" || t.tagName === "TEXTAREA" || t.isContentEditable)) { return; }
    var id = null;
    switch (ev.key) {
      case "ArrowRight": case "PageDown": case "n": id = "room-next"; break;
      case "ArrowLeft": case "PageUp": case "p": id = "room-prev"; break;
      default: return;
    }
    var link = document.getElementById(id);
    if (link) {
      ev.preventDefault();
      window.location.assign(link.href);
    }
  });
})();

// The reasons beside the picture. The server lays the side column out
// for the smallest projector (data-beside) and, where the reasons may fit
// a larger screen's side, sends both the list and the link to the reasons
// display: here, on a projector (the room's layout held to the screen's
// height), the list is shown where it fits the screen the room is on and
// the link where it does not. It fits when nothing scrolls (the page, the
// side column, the list) and the median strip keeps its size (it shrinks
// to what the column leaves). Without script the server's choice stands;
// on a phone the page scrolls, and it stands too. Laid out again when the
// screen changes, when the room's notice above the foot bar comes or goes,
// once the fonts are in, and after a live change brings the part anew.
// The side is not seen until placed (room.css, data-placed), so that the
// link does not stand for a moment where the reasons come.
(function () {
  "use strict";
  var projector = window.matchMedia("(min-width: 60.01rem)");
  function place() {
    var side = document.querySelector(".room-side[data-beside]");
    var list = side && side.querySelector(".room-reasons-beside");
    var more = side && side.querySelector(".room-reasons-more");
    if (!list || !more) { return; }
    var show = function (beside) { list.hidden = !beside; more.hidden = beside; };
    try { choose(side, list, show); } finally { side.setAttribute("data-placed", ""); }
  }
  function choose(side, list, show) {
    if (!projector.matches) {
      show(side.getAttribute("data-beside") === "list");
      return;
    }
    show(false);
    var strip = side.querySelector(".chart-medians");
    var stripHeight = strip ? strip.getBoundingClientRect().height : 0;
    show(true);
    var ul = list.querySelector("ul");
    var page = document.scrollingElement || document.documentElement;
    var fits = side.scrollHeight <= side.clientHeight + 1 &&
      ul.scrollHeight <= ul.clientHeight + 1 &&
      page.scrollHeight <= window.innerHeight + 1 &&
      (!strip || strip.getBoundingClientRect().height >= stripHeight - 1);
    if (!fits) { show(false); }
  }
  place();
  window.addEventListener("resize", place);
  document.addEventListener("parley:live", place);
  if (document.fonts && document.fonts.ready) { document.fonts.ready.then(place); }
  var notice = document.querySelector(".room-live-status");
  if (notice && window.ResizeObserver) { new ResizeObserver(place).observe(notice); }
})();
