// Live preview of an expert's fit while they type. Progressive
// enhancement: without this script the form's "Show the fit" button posts
// the same form and the page is drawn again with the picture.
//
// With it, "Show the fit" (a tap, or Enter in a value box) asks for the
// same fragment at once and brings it into view, the page staying where
// it is: a page posted to show the fit came back, after the answer was
// saved, as the browser's "Confirm Form Resubmission" on Back, and drew
// the fit at the top of a page scrolled away from it. Where the values
// stop the fit, or the request fails, the button posts the form as it
// does without the script: the page that comes back marks each field to
// put right, with its message beside it, which the fragment does not.
//
// On input (debounced), the form is posted to its data-preview URL, a
// same-origin endpoint that returns only the picture and read-backs; the
// answer replaces the element named by data-preview-target. Nothing is
// saved by a preview. Answers to older requests are dropped so a slow
// reply never overwrites a newer one.
//
// Whether or not the preview can run, a value box's "%" follows the
// form's unit choice ("As percentages" shows it) as soon as the choice
// changes, not only when the form has been sent; a box whose value
// carries its own sign shows none, as the server writes it ("9%", not
// "9% %"). What is sent is unchanged.
(function () {
  "use strict";
  Array.prototype.forEach.call(document.querySelectorAll("form"), function (form) {
    var signs = form.querySelectorAll("[data-unit-suffix]");
    var percent = form.querySelector('input[name="unit"][value="percent"]');
    if (!signs.length || !percent) {
      return;
    }
    function follow() {
      Array.prototype.forEach.call(signs, function (sign) {
        var box = sign.parentNode.querySelector("input");
        var own = box && /%\s*$/.test(box.value);
        sign.hidden = !percent.checked || own;
      });
    }
    form.addEventListener("change", function (ev) {
      if (ev.target && ev.target.name === "unit") {
        follow();
      }
    });
    form.addEventListener("input", follow);
  });
})();

(function () {
  "use strict";
  var forms = document.querySelectorAll("form[data-preview]");
  if (!forms.length || !window.fetch || !window.FormData || !window.URLSearchParams) {
    return;
  }
  // pageMessage turns a whole page answered instead of the preview into
  // one paragraph of its heading and message, so that the expert reads
  // why (such as "ask the facilitator for your current link") without a
  // second page drawn inside this one.
  function pageMessage(html) {
    var doc = new DOMParser().parseFromString(html, "text/html");
    var main = doc.querySelector("main") || doc.body;
    var parts = [];
    Array.prototype.forEach.call(main.querySelectorAll("h1, .message p, .form-error"), function (el) {
      var t = el.textContent.trim();
      if (t) { parts.push(t.replace(/[.:]?$/, ".")); }
    });
    var p = document.createElement("p");
    p.className = "preview-problem";
    p.setAttribute("role", "status");
    p.textContent = (parts.length ? parts.join(" ") : "The fit could not be shown just now.") +
      " Your values are still in the form.";
    return p.outerHTML;
  }
  Array.prototype.forEach.call(forms, function (form) {
    var target = document.getElementById(form.getAttribute("data-preview-target"));
    var url = form.getAttribute("data-preview");
    if (!target || !url) {
      return;
    }
    var timer = null;
    var latest = 0;
    // said is the fit in brief for a screen reader, in a line of its own:
    // the preview was a live region itself, read out whole (read-backs,
    // the picture's descriptions, its axes' labels) at every pause in
    // typing and every chip placed.
    var said = document.createElement("p");
    said.className = "visually-hidden";
    said.id = target.id + "-said";
    said.setAttribute("aria-live", "polite");
    target.insertAdjacentElement("afterend", said);
    // brief is what stops the fit, or what the values imply taken
    // together (the last read-back) and any warning.
    function brief() {
      var problem = target.querySelector(".preview-problem");
      if (problem) { return problem.textContent.replace(/\s+/g, " ").trim(); }
      var parts = [];
      var backs = target.querySelectorAll(".readbacks li");
      if (backs.length) { parts.push(backs[backs.length - 1].textContent); }
      Array.prototype.forEach.call(target.querySelectorAll(".warnings li"), function (w) { parts.push(w.textContent); });
      return parts.join(" ").replace(/\s+/g, " ").trim();
    }
    // shown is the "Show the fit" button (the form's first, which Enter in
    // a value box presses), when it can be pressed.
    var shown = form.querySelector("button[type=submit]:not([formaction]):not([disabled])");
    // submitPlain posts the form as "Show the fit" does without the
    // script; requestSubmit clicks nothing, so the button's handler lets
    // it go.
    function submitPlain() {
      if (form.requestSubmit) {
        form.requestSubmit(shown);
      } else {
        form.submit();
      }
    }
    function send(asked) {
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
              send(asked);
            }
          }, 1000);
          return null;
        }
        if (asked && resp.status === 422 && ticket === latest) {
          submitPlain();
          return null;
        }
        // 200 is the picture, 422 what stops the fit, both fragments of
        // the preview; any other answer is a whole page (a link ended or
        // replaced, the server failing), whose message alone is shown.
        return resp.text().then(function (html) {
          return resp.ok || resp.status === 422 ? html : pageMessage(html);
        });
      }).then(function (html) {
        if (html === null || ticket !== latest) {
          return;
        }
        keepRoom();
        target.innerHTML = html;
        said.textContent = brief();
        target.setAttribute("data-updated", String(ticket));
        if (asked) {
          bringIntoView();
        }
      }).catch(function () {
        // The form still works by plain post; leave the last picture, or,
        // where the expert asked for the fit, post the form for it.
        if (asked && ticket === latest) {
          submitPlain();
        }
      }).then(function () {
        if (ticket === latest) {
          target.removeAttribute("aria-busy");
        }
      });
    }
    // keepRoom holds the preview at the tallest it has been drawn, before
    // it is drawn again: the form, Save among it, stands above the
    // preview, and a picture followed by a line saying what stops the
    // fit shortened the page by a screen; the browser, scrolled past the
    // page's new end, scrolled up, and Save moved down the screen under
    // the expert's thumb as she tapped it. A new width (a phone turned)
    // lays the picture out afresh, so the room held is let go.
    var width = window.innerWidth;
    function keepRoom() {
      target.style.minHeight = target.getBoundingClientRect().height + "px";
    }
    window.addEventListener("resize", function () {
      if (window.innerWidth !== width) {
        width = window.innerWidth;
        target.style.minHeight = "";
      }
    });
    // bringIntoView scrolls the fit to the screen's top; where the
    // focus is on a button just above it (Show the fit, by keyboard or
    // tap), to the button instead, so the focus stays in view: scrolled
    // to the fit, the focused button stood just above the screen.
    function bringIntoView() {
      var a = document.activeElement;
      if (a && a.tagName === "BUTTON" && form.contains(a)) {
        var gap = target.getBoundingClientRect().top - a.getBoundingClientRect().top;
        if (gap >= 0 && gap < window.innerHeight / 3) {
          a.scrollIntoView({ block: "start" });
          return;
        }
      }
      target.scrollIntoView({ block: "start" });
    }
    form.addEventListener("input", function (ev) {
      if (ev.target && ev.target.name === "reason") {
        return;
      }
      window.clearTimeout(timer);
      timer = window.setTimeout(function () { send(false); }, 350);
    });
    if (shown) {
      // A click, or Enter in a value box (which clicks the form's first
      // button).
      shown.addEventListener("click", function (ev) {
        ev.preventDefault();
        window.clearTimeout(timer);
        send(true);
      });
    }
  });
})();

// A refused answer comes back as a new page, which a browser shows from
// its top with the focus on nothing: on a phone the field to put right
// lay a screen or more below, and a screen reader started over from the
// masthead. The first field the page marks is focused, and so scrolled
// into view, its message read with it (aria-describedby).
(function () {
  "use strict";
  var first = document.querySelector(".answer-form .field-invalid input:not([type=hidden]), .answer-form .field-invalid select, .answer-form .field-invalid textarea");
  if (first && typeof first.focus === "function") {
    first.focus();
  }
})();

// A refused save (and "Show the fit" posted without the live preview)
// comes back as the answer of a post, at the address .../save or
// .../preview. Back to such a page, after the corrected answer was saved,
// was the browser's "Confirm Form Resubmission", and so was a reload, or a
// phone bringing the tab back. The page takes the question's own address
// instead (the form's action without /preview), so that either opens the
// question afresh; what is typed meanwhile rides in the history entry's
// state, and a reload puts it back in the form. It rides with the number
// of saves the page listed: once a save has been made since (the
// corrected answer, which Back returns from), the page shows the saved
// answer, not the values typed before it. (The state cannot be cleared
// as the form is sent: changing it then stops the browser sending it.)
(function () {
  "use strict";
  var form = document.querySelector("form.answer-form");
  if (!form || !window.history || !history.replaceState) {
    return;
  }
  var action = form.getAttribute("action") || "";
  var base = action.replace(/\/preview$/, "");
  var fields = Array.prototype.filter.call(form.elements, function (el) {
    return el.name && !el.readOnly && !el.disabled && el.type !== "hidden" && el.type !== "submit" && el.type !== "button";
  });
  function typed() {
    var t = {};
    fields.forEach(function (el) {
      if (el.type === "radio") {
        if (el.checked) { t[el.name] = el.value; }
      } else {
        t[el.name] = el.value;
      }
    });
    return t;
  }
  var saves = document.querySelectorAll("section.history tbody tr").length;
  var posted = /\/(save|preview)$/.test(location.pathname) && base !== action;
  var st = history.state;
  if (posted) {
    history.replaceState({ parleyTyped: typed(), parleySaves: saves }, "", base);
  } else if (st && st.parleyTyped && st.parleySaves === saves && location.pathname === base) {
    var t = history.state.parleyTyped, changed = false;
    fields.forEach(function (el) {
      if (!Object.prototype.hasOwnProperty.call(t, el.name)) { return; }
      if (el.type === "radio") {
        if (el.checked !== (el.value === t[el.name])) { el.checked = el.value === t[el.name]; changed = true; }
      } else if (el.value !== t[el.name]) {
        el.value = t[el.name];
        changed = true;
      }
    });
    if (changed) {
      // The live preview, the chips board and the % signs follow.
      fields.forEach(function (el) { el.dispatchEvent(new Event("input", { bubbles: true })); });
      form.dispatchEvent(new Event("change", { bubbles: true }));
    }
  } else {
    return;
  }
  // On input only (a choice of unit or channel sends one too): the state
  // changed as a box lost the focus to the save button, on "change",
  // stopped the browser sending the form.
  function keep() { history.replaceState({ parleyTyped: typed(), parleySaves: saves }, ""); }
  form.addEventListener("input", keep);
})();
