// Text areas with a length limit show, as the person types, how many
// characters are left; the browser's maxlength already stops them at the
// limit, and the server checks it again.
(function () {
  "use strict";
  Array.prototype.forEach.call(document.querySelectorAll("textarea[maxlength]"), function (ta) {
    var max = parseInt(ta.getAttribute("maxlength"), 10);
    if (!max) { return; }
    var note = document.createElement("span");
    note.className = "text-count";
    note.id = ta.id + "-count";
    note.setAttribute("aria-live", "polite");
    ta.insertAdjacentElement("afterend", note);
    function show() {
      var left = max - ta.value.length;
      note.textContent = left + " of " + max + " characters left";
      note.classList.toggle("text-count-near", left < max / 10);
    }
    ta.addEventListener("input", show);
    show();
  });
})();
