// The one event stream of a workshop for every tab of a browser that
// shows it (live.js starts it, named by the stream's address). Each tab
// is told of every change, and of the stream's state; after the stream
// was away, of a change too, since what happened meanwhile was not sent.
// Each tab is told the workshop's count of changes ("version V") as the
// stream opens and as it joins, so that a tab whose page was read before
// a change it was not yet listening for fetches itself again.
"use strict";
var ports = [];
var current = null;
var version = null;
var stream = null;
var dropped = false;
// retryAfter is how long a refused stream waits before asking again, in ms.
var retryAfter = 5000;
var retry = null;
// silentAfter is how long the stream may say nothing before it is taken
// for dead, in ms: a little over two of the server's beats (hello says how
// often they come), about 45 s. A connection left dead by a laptop's
// sleep looks open to EventSource; the tabs said they followed the
// workshop while they heard nothing. Such a stream is closed and opened
// anew, the tabs told meanwhile ("silent"), and of a change once it is
// back.
var silentAfter = 45000;
var quiet = null;
// ended is set once an expert's stream says its link no longer works
// ("gone"): the tabs are told, and the stream is not asked for again.
var ended = false;

function send(msg) {
  current = msg === "change" ? current : msg;
  ports.forEach(function (p) { p.postMessage(msg); });
}

function versionIn(data) {
  try {
    return JSON.parse(data).version || null;
  } catch (e) {
    return null;
  }
}

// tell gives a tab that joins (or comes back) the stream's state and
// the count of changes it has heard of.
function tell(port) {
  if (current) { port.postMessage(current); }
  if (version) { port.postMessage("version " + version); }
}

function start() {
  if (ended) {
    send("gone");
    return;
  }
  if (retry) { // one stream asked for at a time, a page's arrival or the timer
    clearTimeout(retry);
    retry = null;
  }
  if (typeof EventSource === "undefined") {
    send("unsupported");
    return;
  }
  var es = new EventSource(self.name);
  stream = es;
  // The silence is measured on the wall clock, looked at every few
  // seconds: a laptop's sleep stops the clock of the worker's timers, so a
  // timer set for silentAfter fired up to silentAfter after it woke.
  var heardAt = Date.now();
  if (quiet) { clearInterval(quiet); }
  quiet = setInterval(function () {
    if (stream !== es) {
      clearInterval(watch);
      return;
    }
    if (Date.now() - heardAt < silentAfter) { return; }
    clearInterval(watch);
    quiet = null;
    es.close();
    dropped = true;
    send("silent " + heardAt); // when it last spoke, for the tabs' notice
    start();
  }, Math.min(5000, silentAfter / 4));
  var watch = quiet;
  // alive notes that the stream spoke.
  function alive() {
    heardAt = Date.now();
  }
  alive();
  es.addEventListener("change", function (e) {
    alive();
    version = versionIn(e.data) || version;
    send("change");
  });
  es.addEventListener("gone", function () {
    ended = true;
    if (quiet) { clearInterval(quiet); quiet = null; }
    es.close();
    send("gone");
  });
  es.addEventListener("hello", function (e) {
    alive();
    version = versionIn(e.data);
    try {
      var beat = JSON.parse(e.data).beat;
      if (beat > 0) { silentAfter = Math.round(2.25 * beat); }
    } catch (err) { /* the last interval heard stands */ }
    if (version) {
      ports.forEach(function (p) { p.postMessage("version " + version); });
    }
  });
  es.addEventListener("beat", function (e) {
    alive();
    var v = versionIn(e.data);
    if (v && v !== version) {
      version = v;
      ports.forEach(function (p) { p.postMessage("version " + version); });
    }
  });
  es.addEventListener("open", function () {
    alive();
    send("connected");
    if (dropped) {
      dropped = false;
      send("change");
    }
  });
  es.addEventListener("error", function () {
    dropped = true;
    if (es.readyState !== EventSource.CLOSED) {
      send("reconnecting");
      return;
    }
    // Refused (the session ended, too many streams open, the server
    // stopping): EventSource does not ask again by itself, and the tabs
    // stood still until one was reloaded. Ask again in a while.
    if (quiet) { clearInterval(quiet); quiet = null; }
    send("stopped");
    if (!retry) {
      retry = setTimeout(function () {
        retry = null;
        // No tab left listening (each said "bye", as an expert's page
        // whose link no longer works does): nobody to ask for.
        if (stream.readyState === EventSource.CLOSED && ports.length) {
          start();
        }
      }, retryAfter);
    }
  });
}

self.onconnect = function (e) {
  var port = e.ports[0];
  ports.push(port);
  port.onmessage = function (m) {
    var i = ports.indexOf(port);
    if (m.data === "bye" && i >= 0) {
      ports.splice(i, 1);
    } else if (m.data === "hello" && i < 0) {
      ports.push(port);
      tell(port);
    }
  };
  port.start();
  if (typeof EventSource === "undefined") {
    port.postMessage("unsupported");
    return;
  }
  if (!stream || stream.readyState === EventSource.CLOSED) {
    // A stream refused for good (the facilitator signed out) is tried
    // again for a page opened since.
    start();
  } else {
    tell(port);
  }
};
