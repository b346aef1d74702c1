// The one event stream of a workshop for every tab of a browser that
// shows it (live.js starts it, named by the stream's address). Each tab
// is told of every change, and of the stream's state; after the stream
// was away, of a change too, since what happened meanwhile was not sent.
"use strict";
var ports = [];
var current = null;
var stream = null;
var dropped = false;

function send(msg) {
  current = msg === "change" ? current : msg;
  ports.forEach(function (p) { p.postMessage(msg); });
}

function start() {
  if (typeof EventSource === "undefined") {
    send("unsupported");
    return;
  }
  stream = new EventSource(self.name);
  stream.addEventListener("change", function () { send("change"); });
  stream.addEventListener("open", function () {
    send("connected");
    if (dropped) {
      dropped = false;
      send("change");
    }
  });
  stream.addEventListener("error", function () {
    dropped = true;
    send("reconnecting");
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
      if (current) { port.postMessage(current); }
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
  } else if (current) {
    port.postMessage(current);
  }
};
