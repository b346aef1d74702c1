// The sign-in address carries the facilitator secret in the fragment
// (#...), which browsers never send to the server. Take it out of the
// address bar and history at once, put it into the form and post. The
// address also works when pasted into a tab already on the sign-in page:
// then only the fragment changes, no page loads, and "hashchange" is the
// only sign of it.
(function () {
  "use strict";
  var pending = "";
  function take() {
    var secret = window.location.hash.slice(1);
    if (!secret) { return; }
    history.replaceState(null, "", window.location.pathname + window.location.search);
    pending = secret;
    if (document.readyState !== "loading") { post(); }
  }
  function post() {
    var form = document.getElementById("signin-form");
    var input = document.getElementById("secret");
    if (!pending || !form || !input) { return; }
    input.value = pending;
    pending = "";
    form.submit();
  }
  window.addEventListener("hashchange", take);
  document.addEventListener("DOMContentLoaded", post);
  take();
})();
