// Live facilitator pages. Progressive enhancement: without this script
// the pages are complete and simply do not move until reloaded.
//
// An element with data-live-src names the workshop's event stream
// (text/event-stream, same origin). On each change the page is fetched
// again and every element marked data-live is replaced by its namesake
// (same id) in the fresh page, unless the facilitator is typing inside
// it. Changes arriving close together are gathered into one fetch.
(function () {
  "use strict";
  var src = document.querySelector("[data-live-src]");
  if (!src || !window.EventSource || !window.fetch || !window.DOMParser) {
    return;
  }
  var url = src.getAttribute("data-live-src");
  var timer = null;
  var busy = false;
  var again = false;

  function busyTyping(el) {
    var a = document.activeElement;
    return a && a !== document.body && el.contains(a) &&
      (a.tagName === "INPUT" || a.tagName === "TEXTAREA" || a.tagName === "SELECT");
  }

  function refresh() {
    timer = null;
    if (busy) {
      again = true;
      return;
    }
    busy = true;
    fetch(window.location.pathname + window.location.search, { credentials: "same-origin", headers: { "Accept": "text/html" } })
      .then(function (resp) {
        if (!resp.ok) { throw new Error("status " + resp.status); }
        return resp.text();
      })
      .then(function (html) {
        var doc = new DOMParser().parseFromString(html, "text/html");
        Array.prototype.forEach.call(document.querySelectorAll("[data-live]"), function (el) {
          var fresh = el.id && doc.getElementById(el.id);
          if (fresh && !busyTyping(el)) {
            el.replaceWith(document.importNode(fresh, true));
          }
        });
        document.documentElement.setAttribute("data-live-updated", String(Date.now()));
        document.dispatchEvent(new CustomEvent("parley:live"));
      })
      .catch(function () {
        // The next change tries again; the page stays as it was.
      })
      .then(function () {
        busy = false;
        if (again) {
          again = false;
          schedule();
        }
      });
  }

  function schedule() {
    if (!timer) {
      timer = window.setTimeout(refresh, 250);
    }
  }

  var stream = new EventSource(url);
  stream.addEventListener("change", schedule);
  stream.addEventListener("open", function () {
    document.documentElement.setAttribute("data-live", "connected");
  });
  stream.addEventListener("error", function () {
    document.documentElement.setAttribute("data-live", "reconnecting");
  });
})();
