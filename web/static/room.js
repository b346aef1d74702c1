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
