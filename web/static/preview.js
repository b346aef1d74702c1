// Live preview of an expert's fit while they type. Progressive
// enhancement: without this script the form's "Show the fit" button posts
// the same form and the page is drawn again with the picture.
//
// On input (debounced), the form is posted to its data-preview URL, a
// same-origin endpoint that returns only the picture and read-backs; the
// answer replaces the element named by data-preview-target. Nothing is
// saved by a preview. Answers to older requests are dropped so a slow
// reply never overwrites a newer one.
(function () {
  "use strict";
  var forms = document.querySelectorAll("form[data-preview]");
  if (!forms.length || !window.fetch || !window.FormData || !window.URLSearchParams) {
    return;
  }
  Array.prototype.forEach.call(forms, function (form) {
    var target = document.getElementById(form.getAttribute("data-preview-target"));
    var url = form.getAttribute("data-preview");
    if (!target || !url) {
      return;
    }
    var timer = null;
    var latest = 0;
    function send() {
      var ticket = ++latest;
      target.setAttribute("aria-busy", "true");
      fetch(url, {
        method: "POST",
        credentials: "same-origin",
        headers: { "Content-Type": "application/x-www-form-urlencoded" },
        body: new URLSearchParams(new FormData(form)).toString()
      }).then(function (resp) {
        if (resp.status === 429) {
          // Over this expert's allowance of previews: keep the last
          // picture and ask again in a moment, if nothing newer was.
          window.setTimeout(function () {
            if (ticket === latest) {
              send();
            }
          }, 1000);
          return null;
        }
        return resp.text();
      }).then(function (html) {
        if (html === null || ticket !== latest) {
          return;
        }
        target.innerHTML = html;
        target.setAttribute("data-updated", String(ticket));
      }).catch(function () {
        // The form still works by plain post; leave the last picture.
      }).then(function () {
        if (ticket === latest) {
          target.removeAttribute("aria-busy");
        }
      });
    }
    form.addEventListener("input", function (ev) {
      if (ev.target && ev.target.name === "reason") {
        return;
      }
      window.clearTimeout(timer);
      timer = window.setTimeout(send, 350);
    });
  });
})();
