// The one-time sign-in address carries the facilitator secret in the
// fragment (#...), which browsers never send to the server. Move it into
// the form, wipe it from the address bar and history, and post.
(function () {
  "use strict";
  var secret = window.location.hash.slice(1);
  if (!secret) { return; }
  history.replaceState(null, "", window.location.pathname);
  function go() {
    var form = document.getElementById("signin-form");
    var input = document.getElementById("secret");
    if (!form || !input) { return; }
    input.value = secret;
    form.submit();
  }
  if (document.readyState === "loading") {
    document.addEventListener("DOMContentLoaded", go);
  } else {
    go();
  }
})();
