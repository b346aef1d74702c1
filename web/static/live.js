// Live pages: the facilitator's, and an expert's own (their home and a
// question's page). Progressive enhancement: without this script the
// pages are complete and simply do not move until reloaded.
//
// An element with data-live-src names the workshop's event stream
// (text/event-stream, same origin). On each change the page is fetched
// again (at data-live-page, else the address bar's address) and every
// element marked data-live is replaced by its namesake (same id) in the
// fresh page, unless the facilitator is at work in a form inside it
// (see atWork); the focus stays where it was (see replace). Changes
// arriving close together are gathered into one fetch.
(function () {
  "use strict";
  var src = document.querySelector("[data-live-src]");
  if (!src || !window.EventSource || !window.fetch || !window.DOMParser) {
    return;
  }
  var url = src.getAttribute("data-live-src");
  // The page's own address, where it has one: a page shown again after a
  // refused form stands at the form's address, which answers no GET, and
  // fetching that left the page still while it said it followed changes.
  var page = src.getAttribute("data-live-page") || (window.location.pathname + window.location.search);
  var seen = src.getAttribute("data-live-version") || "";
  // An expert's page says, once its link no longer works, why, in its
  // own words (data-live-gone), and stops following (see goneNow).
  var goneWords = src.getAttribute("data-live-gone");
  var gone = false;
  var timer = null;
  var busy = false;
  var again = false;
  // each calls fn on every element of the page that sel matches.
  function each(sel, fn) { Array.prototype.forEach.call(document.querySelectorAll(sel), fn); }

  // atWork says the facilitator is at work in a form inside el: a refused
  // form shown in it, the focus on one of its fields or buttons, or a
  // field changed from what the page came with (words typed, then Tab to
  // the button, or a click elsewhere). Such a part is left as it is; replacing it threw the
  // typed words away and dropped the focus to the top of the page.
  function atWork(el) {
    // A refused form's message, and the words it kept, stay until the
    // facilitator sends it again (the overview's Rounds card).
    if (el.querySelector(".form-error, .field-error")) {
      return true;
    }
    // A fold the facilitator opened (the details' form, the agreed
    // prior's quick construction) stays open: replaced, it closed under
    // the reader.
    if (el.querySelector("details[data-opened-here][open]")) {
      return true;
    }
    var a = document.activeElement;
    if (a && a !== document.body && el.contains(a) &&
      (a.tagName === "INPUT" || a.tagName === "TEXTAREA" || a.tagName === "SELECT" || a.tagName === "BUTTON")) {
      return true;
    }
    return Array.prototype.some.call(el.querySelectorAll("input, textarea, select"), function (f) {
      if (f.type === "hidden") { return false; }
      if (f.type === "checkbox" || f.type === "radio") { return f.checked !== f.defaultChecked; }
      if (f.tagName === "SELECT") {
        if (f.multiple) {
          return Array.prototype.some.call(f.options, function (o) { return o.selected !== o.defaultSelected; });
        }
        // A choice that names no default comes with its first option:
        // compared option by option, it counted as changed from the
        // start, and the panel's choice of expert held its part for good.
        var first = 0;
        Array.prototype.forEach.call(f.options, function (o, i) { if (o.defaultSelected) { first = i; } });
        return f.selectedIndex !== first;
      }
      return f.value !== f.defaultValue;
    });
  }

  // Folds opened by the facilitator's own hand, for atWork.
  document.addEventListener("click", function (e) {
    var summary = e.target.closest && e.target.closest("summary");
    if (summary && summary.parentElement && summary.parentElement.tagName === "DETAILS") {
      summary.parentElement.setAttribute("data-opened-here", "");
    }
  });

  // A part left as it was (held, by id) is brought up to date once the
  // focus moves on and leaves it free: not one still holding changed
  // fields, nor one showing a refused form's message, which stays until
  // the form is sent again. Each blur fetched the page again while such
  // a part was held, and found it held again. The focus has not landed
  // yet while focusout runs, so it is looked at a moment later.
  var held = [];
  document.addEventListener("focusout", function () {
    if (!held.length) { return; }
    window.setTimeout(function () {
      var freed = held.some(function (id) {
        var el = document.getElementById(id);
        return el && !atWork(el);
      });
      if (freed) {
        held = [];
        schedule();
      }
    }, 0);
  });

  // focusable lists what the keyboard can reach in el, in page order.
  var reachable = "a[href], button, input, select, textarea, summary, [tabindex]";
  function focusable(el) {
    var all = Array.prototype.slice.call(el.querySelectorAll(reachable));
    if (el.matches(reachable)) { all.unshift(el); }
    return all;
  }

  // replace puts fresh in el's place. Where the focus was inside el (a
  // link, the scrolling table), it is put on the same place in fresh: by
  // its id, else by its rank among what the keyboard reaches; replacing
  // dropped it to the top of the page, and the next Tab started over.
  //
  // A part marked data-live-region is a live region (role="status"): it
  // stays on the page and takes the fresh part's contents, since screen
  // readers announce a change inside a region they already know and may
  // say nothing of a region put in anew.
  function replace(el, fresh) {
    var a = document.activeElement;
    var rank = -1;
    var id = "";
    if (a && a !== document.body && el.contains(a)) {
      id = a.id;
      rank = focusable(el).indexOf(a);
    }
    if (el.hasAttribute("data-live-region")) {
      el.replaceChildren.apply(el, Array.prototype.slice.call(fresh.childNodes));
      fresh = el;
    } else {
      el.replaceWith(fresh);
    }
    if (rank < 0 && !id) { return; }
    var back = (id && document.getElementById(id)) || focusable(fresh)[rank];
    if (back && fresh.contains(back)) {
      back.focus({ preventScroll: true });
    }
  }

  // placeOnScreen is the first live part on the screen, and where it
  // stands, for keepPlace (DEVELOPERS.md, "Live pages").
  function placeOnScreen() {
    if (window.scrollY <= 0) { return null; }
    var parts = document.querySelectorAll("[data-live]");
    for (var i = 0; i < parts.length; i++) {
      var r = parts[i].getBoundingClientRect();
      if (parts[i].id && r.bottom > 0 && r.height > 0) {
        return r.top < window.innerHeight ? { id: parts[i].id, top: r.top } : null;
      }
    }
    return null;
  }

  // keepPlace scrolls so that the part placeOnScreen found stands where
  // it stood before the parts were replaced.
  function keepPlace(place) {
    var el = place && document.getElementById(place.id);
    if (!el) { return; }
    var moved = el.getBoundingClientRect().top - place.top;
    if (Math.abs(moved) >= 0.5) {
      window.scrollBy(0, moved);
    }
  }

  // A fetch is given up after fetchLimit ms; one that failed is tried
  // again after failedWait ms, doubling up to a minute.
  var fetchLimit = 15000;
  var failedWait = 2000;
  var wait = failedWait;

  function refresh() {
    timer = null;
    if (gone) { return; }
    if (busy) {
      again = true;
      return;
    }
    busy = true;
    var stop = window.AbortController ? new AbortController() : null;
    var limit = stop ? window.setTimeout(function () { stop.abort(); }, fetchLimit) : null;
    var delay = 0;
    fetch(page, { credentials: "same-origin", headers: { "Accept": "text/html" }, signal: stop ? stop.signal : undefined })
      .then(function (resp) {
        if (goneWords && (resp.status === 404 || resp.status === 410)) {
          return resp.text().then(function (html) {
            goneNow(resp.status, html);
            return null;
          });
        }
        if (!resp.ok) { throw new Error("status " + resp.status); }
        return resp.text();
      })
      .then(function (html) {
        if (html === null) { return; }
        var doc = new DOMParser().parseFromString(html, "text/html");
        var marked = doc.querySelector("[data-live-src]");
        if (marked) { seen = marked.getAttribute("data-live-version") || ""; }
        var place = placeOnScreen();
        held = [];
        // Parts that change layout together (data-live-together) are put in
        // together, the parts at work in them carried into the fresh ones
        // as they are; held together where that cannot be (DEVELOPERS.md).
        var together = {};
        var carried = [];
        var a = document.activeElement;
        var sel = a && [a.selectionStart, a.selectionEnd, a.selectionDirection, a.scrollTop];
        function group(el) { return el.getAttribute("data-live-together"); }
        each("[data-live-together]", function (el) {
          if (!atWork(el)) { return; }
          var g = group(el);
          var parts = Array.prototype.filter.call(el.querySelectorAll("[data-live]"), function (p) {
            return atWork(p) && !Array.prototype.some.call(p.querySelectorAll("[data-live]"), atWork);
          });
          if (!parts.length || parts.some(function (p) {
            var n = p.id && doc.getElementById(p.id);
            return !n || !n.closest('[data-live-together="' + g + '"]');
          })) {
            together[g] = true;
          }
          carried = carried.concat(parts);
        });
        carried = carried.filter(function (p) { return !together[group(p.closest("[data-live-together]"))]; });
        var typing = a && carried.some(function (p) { return p.contains(a); });
        var r = typing && a.id && a.getBoundingClientRect();
        if (r && r.bottom > 0 && r.top < window.innerHeight) { place = { id: a.id, top: r.top }; }
        each("[data-live]", function (el) {
          if (!el.isConnected || carried.indexOf(el) >= 0) { return; }
          var fresh = el.id && doc.getElementById(el.id);
          var g = group(el);
          if (fresh && offers(el, fresh)) {
            offered[el.id] = fresh;
          } else if (fresh && (!g || together[g]) && atWork(el)) {
            held.push(el.id);
          } else if (fresh && !together[g]) {
            fresh = document.importNode(fresh, true);
            carried.forEach(function (p) {
              var n = fresh.querySelector('[id="' + p.id + '"]');
              if (!n) { return; }
              n.replaceWith(p);
              Array.prototype.forEach.call(p.querySelectorAll("[data-live]"), function (q) {
                var m = n.querySelector('[id="' + q.id + '"]');
                if (m && !atWork(q)) { q.replaceWith(m); }
              });
            });
            replace(el, fresh);
          }
        });
        carried.forEach(function (p) { held.push(p.id); });
        if (typing && a !== document.activeElement) {
          a.focus({ preventScroll: true });
          if (sel[0] != null) { a.setSelectionRange(sel[0], sel[1], sel[2]); }
          a.scrollTop = sel[3];
        }
        wait = failedWait;
        notice(false);
        document.documentElement.setAttribute("data-live-updated", String(Date.now()));
        // The pages' own scripts complete the new parts (page.js) before
        // the place is kept, which counts their height.
        document.dispatchEvent(new CustomEvent("parley:live"));
        keepPlace(place);
      })
      .catch(function () {
        again = true;
        delay = wait;
        wait = Math.min(2 * wait, 60000);
      })
      .then(function () {
        if (limit) { window.clearTimeout(limit); }
        busy = false;
        if (again) {
          again = false;
          schedule(delay);
        }
      });
  }

  // A part marked data-live-offer is not put in under the reader once it
  // would show something new (its key differs: an expert's page of round 1
  // reached by round 2's feedback, drawn where the expert may be reading
  // or typing): the fresh part is kept, and the page offers it, a button
  // marked data-live-show naming it. Changes within what it already
  // shows (a reason withheld) are swapped in as any part is.
  var offered = {};
  function offers(el, fresh) {
    var key = el.getAttribute("data-live-offer");
    var next = fresh.getAttribute("data-live-offer");
    return key !== null && next !== key && next !== "none";
  }
  document.addEventListener("click", function (e) {
    var button = e.target.closest && e.target.closest("[data-live-show]");
    if (!button) { return; }
    var id = button.getAttribute("data-live-show");
    var el = document.getElementById(id);
    if (el && offered[id]) {
      var fresh = document.importNode(offered[id], true);
      delete offered[id];
      el.replaceWith(fresh);
      el = fresh;
      document.dispatchEvent(new CustomEvent("parley:live"));
    }
    if (!el) { return; }
    el.scrollIntoView({ block: "start" });
    var heading = el.querySelector("h2");
    if (heading) {
      heading.setAttribute("tabindex", "-1");
      heading.focus({ preventScroll: true });
    }
  });

  // goneNow says, on an expert's page, that it can no longer save: the
  // link was ended or replaced (404), or the question withdrawn (410, in
  // the words of the page the server answered). Every place marked
  // data-live-gone-slot says so, the save button is disabled and says
  // why, and the page stops following: nothing typed is touched.
  function goneNow(status, html) {
    gone = true;
    var words = goneWords;
    var button = src.getAttribute("data-live-gone-button");
    if (status === 410) {
      var doc = new DOMParser().parseFromString(html, "text/html");
      var parts = [];
      Array.prototype.forEach.call(doc.querySelectorAll("main h1, main .message p"), function (el) {
        var t = el.textContent.trim();
        if (t) { parts.push(t.replace(/[.:]?$/, ".")); }
      });
      if (parts.length) { words = parts.join(" ") + " Anything you typed stays here."; }
      button = src.getAttribute("data-live-withdrawn-button") || button;
    }
    each("[data-live-gone-slot]", function (slot) {
      var p = document.createElement("p");
      p.className = "banner banner-gone";
      p.setAttribute("role", "alert");
      p.textContent = words;
      slot.replaceChildren(p);
    });
    // A link ended: the phone's next holder finds the draft and nothing
    // of whose link it was (not even the saved answer, each field's
    // default). A question withdrawn (410) is still its owner's page.
    if (status === 404) {
      each("[data-live-gone-hide]", function (el) { el.remove(); });
      each("[data-live-gone-words]", function (el) { el.textContent = el.getAttribute("data-live-gone-words"); });
      each("input, textarea", function (f) {
        if (f.type === "radio") { f.defaultChecked = f.checked; } else { f.defaultValue = f.value; }
      });
    }
    each("[data-live-save] button", function (b) {
      b.disabled = true;
      b.removeAttribute("formaction");
      if (button) { b.textContent = button; }
    });
    var note = document.getElementById("live-stopped");
    if (note) { note.remove(); }
    document.documentElement.setAttribute("data-live", "gone");
    if (worker) { worker.port.postMessage("bye"); }
    if (own) { own.close(); }
  }

  // schedule fetches the page in 250 ms (changes close together are
  // gathered) or delay ms; a change heard cuts a failed fetch's wait short.
  var due = 0;
  function schedule(delay) {
    if (gone) { return; }
    var d = delay || 250;
    if (timer) {
      if (delay || due <= Date.now() + d) {
        return;
      }
      window.clearTimeout(timer);
      wait = failedWait;
    }
    due = Date.now() + d;
    timer = window.setTimeout(refresh, d);
  }

  // retryAfter is how long a refused stream waits before asking again,
  // in ms, as in live-worker.js.
  var retryAfter = 5000;

  // state notes the stream's state on the page, in words on its status
  // line (.live-status; the room view's says nothing while all is well).
  // A stream refused (the session ended, too many streams, the server
  // stopping) or found silent (see silentAfter) is said at once; one
  // trying to reach the server again, once it has tried for staleAfter
  // ms, so that a short break shows nothing. The projector stood silently
  // stale: its room view had no status line.
  var staleAfter = 10000;
  var stale = null;
  var since = null;
  var current = "";
  // at, for a stream found silent, is when it last spoke (ms on the wall
  // clock): the notice said the time the silence was noticed, some 45 s
  // after the page last heard of the workshop.
  function state(s, at) {
    if (gone) { return; }
    // A stream refused may be a link that no longer works: the page's
    // own fetch tells (goneNow).
    if (goneWords && s === "stopped" && current !== "stopped") { schedule(); }
    current = s;
    document.documentElement.setAttribute("data-live", s);
    if (s === "connected") {
      since = null;
      if (stale) { window.clearTimeout(stale); stale = null; }
    } else if (!since) {
      since = at ? new Date(at) : new Date();
    }
    if (s === "reconnecting" && !stale) {
      stale = window.setTimeout(function () {
        stale = null;
        if (current === "reconnecting") { notice(true); }
      }, staleAfter);
    }
    notice(s === "stopped" || s === "silent");
  }

  // notice shows the words that the page does not follow the workshop,
  // or takes them away once the stream is back. They are put back after
  // a fetch of the page that replaced the line holding them. A status
  // line may carry its own words (data-live-stopped, where "{since}" is
  // the time the stream went away).
  var noticed = false;
  function notice(show) {
    if (show) {
      noticed = true;
    } else if (current === "connected") {
      noticed = false;
    }
    var note = document.getElementById("live-stopped");
    var line = document.querySelector(".live-status");
    if (!noticed) {
      if (note) { note.remove(); }
      return;
    }
    if (note || !line) { return; }
    var words = line.getAttribute("data-live-stopped") ||
      "Not following the workshop since {since}: this page may be out of date. " +
      "It asks the server again every few seconds and catches up by itself; if you were signed out, sign in again.";
    var hhmm = ("0" + since.getHours()).slice(-2) + ":" + ("0" + since.getMinutes()).slice(-2);
    note = document.createElement("strong");
    note.id = "live-stopped";
    note.setAttribute("role", "status");
    note.textContent = words.replace("{since}", hhmm);
    line.appendChild(note);
  }

  // heard is the workshop's count of changes as a stream tells it.
  function heard(version) {
    if (version && version !== seen) {
      schedule();
    }
  }

  // silentAfter is how long a stream may say nothing before it is closed
  // and opened anew, in ms: 2.25 of the server's beats (hello says how
  // often they come). As in live-worker.js.
  var silentAfter = 45000;
  function beatsOf(data) {
    try {
      var beat = JSON.parse(data).beat;
      if (beat > 0) { silentAfter = Math.round(2.25 * beat); }
    } catch (err) { /* the last interval heard stands */ }
  }

  // One stream per browser, not per tab, held by a shared worker
  // (live-worker.js); without one, the page holds its own.
  var own = null;
  function direct(again) {
    if (gone) { return; }
    var stream = new EventSource(url);
    own = stream;
    var dropped = !!again;
    // The silence is measured on the wall clock, looked at every few
    // seconds: a laptop's sleep stops the clock of the page's timers, so
    // a timer set for silentAfter fired up to silentAfter after it woke,
    // the page saying all the while that it followed the workshop.
    var heardAt = Date.now();
    var quiet = window.setInterval(function () {
      if (gone) {
        window.clearInterval(quiet);
        return;
      }
      if (Date.now() - heardAt < silentAfter) { return; }
      window.clearInterval(quiet);
      quiet = null;
      stream.close();
      state("silent", heardAt);
      direct(true);
    }, Math.min(5000, silentAfter / 4));
    // alive notes that the stream spoke.
    function alive() {
      heardAt = Date.now();
    }
    alive();
    stream.addEventListener("change", function () { alive(); schedule(); });
    // The link no longer works: the page's fetch says so (goneNow).
    stream.addEventListener("gone", function () {
      if (quiet) { window.clearInterval(quiet); quiet = null; }
      stream.close();
      schedule();
    });
    stream.addEventListener("hello", function (e) {
      beatsOf(e.data);
      alive();
      try { heard(JSON.parse(e.data).version); } catch (err) { schedule(); }
    });
    stream.addEventListener("beat", function (e) {
      alive();
      try { heard(JSON.parse(e.data).version); } catch (err) { /* a beat says nothing new */ }
    });
    stream.addEventListener("open", function () {
      alive();
      state("connected");
      if (dropped) {
        dropped = false;
        schedule(); // what changed while the stream was away
      }
    });
    stream.addEventListener("error", function () {
      dropped = true;
      if (stream.readyState !== EventSource.CLOSED) {
        state("reconnecting");
        return;
      }
      // Refused: EventSource does not ask again by itself.
      if (quiet) { window.clearInterval(quiet); quiet = null; }
      state("stopped");
      window.setTimeout(direct, retryAfter);
    });
  }

  var worker = null;
  if (!window.SharedWorker) {
    direct();
    return;
  }
  try {
    worker = new SharedWorker("/static/live-worker.js", { name: url });
  } catch (e) {
    direct();
    return;
  }
  worker.port.onmessage = function (m) {
    if (typeof m.data === "string" && m.data.indexOf("version ") === 0) {
      heard(m.data.slice("version ".length));
      return;
    }
    if (typeof m.data === "string" && m.data.indexOf("silent ") === 0) {
      state("silent", Number(m.data.slice("silent ".length)) || 0);
      return;
    }
    switch (m.data) {
      case "change":
      case "gone":
        schedule();
        break;
      case "connected":
      case "reconnecting":
      case "stopped":
      case "silent":
        state(m.data);
        break;
      case "unsupported":
        worker.port.close();
        direct();
        break;
    }
  };
  worker.port.start();
  window.addEventListener("pagehide", function () {
    worker.port.postMessage("bye");
  });
  window.addEventListener("pageshow", function (e) {
    if (e.persisted) { // back from the browser's page cache: listen again, and catch up
      worker.port.postMessage("hello");
      schedule();
    }
  });
})();
