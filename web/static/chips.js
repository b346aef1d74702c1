// Chips you can place. Progressive enhancement: without this script the
// form is a column of boxes, one per bin, and an empty box holds no chips.
//
// With it, the boxes are drawn as a board: one column per bin over the
// question's range, a stack of chips in each that grows and shrinks as
// chips are placed and taken away, and the count of chips left. A chip
// is placed by tapping or clicking the column (or its + button) and taken
// away by tapping a chip (or the − button). By keyboard: Tab reaches the
// board, at one column; + or ↑ places a chip, − or ↓ takes one away, ←
// and → move to the neighbouring bin, as the board says while it has the
// focus. Each change is announced. The boxes stay the form's
// values, so saving, the live preview and the plain form are unchanged.
//
// Where the columns would be too narrow to tap (many bins on a phone:
// twenty bins on 360 px left 10 px buttons and ranges broken a digit to a
// line), the board turns on its side: one row per bin, its range on the
// left, the chips stacked rightwards, and its buttons at the end.
(function () {
  "use strict";
  var board = document.querySelector(".chips-board");
  if (!board) { return; }
  var form = board.closest("form");
  var inputs = Array.prototype.slice.call(form.querySelectorAll(".chip-field input"));
  if (!inputs.length) { return; }
  var total = parseInt(board.getAttribute("data-chips"), 10) || 0;
  var readonly = board.hasAttribute("data-readonly");
  var labels = inputs.map(function (inp) {
    var l = form.querySelector('label[for="' + inp.id + '"]');
    return l ? l.textContent.replace(/^Chips /, "") : inp.name;
  });

  function count(i) {
    var n = parseInt(inputs[i].value, 10);
    return isNaN(n) || n < 0 ? 0 : n;
  }
  function placed() {
    var s = 0;
    for (var i = 0; i < inputs.length; i++) { s += count(i); }
    return s;
  }

  var status = document.createElement("p");
  status.className = "chips-status";
  status.setAttribute("aria-live", "polite");
  var grid = document.createElement("div");
  grid.className = "chips-grid";
  grid.setAttribute("role", "group");
  grid.setAttribute("aria-label", "Your chips, one column per range of values");
  grid.setAttribute("aria-describedby", readonly ? "chips-hint" : "chips-hint chips-keys");
  // The keys, said under the board while it has the focus and read with
  // its columns: Tab reaches the board once (its + and − buttons are for
  // tapping), and nothing said how to place chips from there.
  var keys = document.createElement("p");
  keys.className = "chips-keys hint";
  keys.id = "chips-keys";
  keys.textContent = "Keys: ↑ or + places a chip in the bin with the focus, ↓ or − takes one away, ← and → move to the next bin.";
  var columns = [];

  inputs.forEach(function (inp, i) {
    var col = document.createElement("div");
    col.className = "chips-bin";
    col.tabIndex = i === 0 ? 0 : -1;
    col.setAttribute("role", "spinbutton");
    col.setAttribute("aria-valuemin", "0");
    col.setAttribute("aria-valuemax", String(total));
    col.setAttribute("aria-label", "Chips " + labels[i]);
    var stack = document.createElement("div");
    stack.className = "chips-stack";
    var buttons = document.createElement("div");
    buttons.className = "chips-buttons";
    var add = document.createElement("button");
    add.type = "button";
    add.className = "chips-add";
    add.textContent = "+";
    add.setAttribute("aria-label", "Place a chip " + labels[i]);
    add.tabIndex = -1;
    var take = document.createElement("button");
    take.type = "button";
    take.className = "chips-take";
    take.textContent = "−";
    take.setAttribute("aria-label", "Take a chip away " + labels[i]);
    take.tabIndex = -1;
    buttons.appendChild(add);
    buttons.appendChild(take);
    var edge = document.createElement("span");
    edge.className = "chips-range";
    edge.textContent = labels[i].replace(/^from /, "").replace(" to ", "–");
    edge.setAttribute("aria-hidden", "true");
    col.appendChild(stack);
    if (!readonly) { col.appendChild(buttons); }
    col.appendChild(edge);
    grid.appendChild(col);
    columns.push({ col: col, stack: stack, add: add, take: take, range: edge });

    if (readonly) { return; }
    add.addEventListener("click", function (ev) { ev.stopPropagation(); change(i, +1); });
    take.addEventListener("click", function (ev) { ev.stopPropagation(); change(i, -1); });
    stack.addEventListener("click", function (ev) {
      // A chip taps away; the empty space above places one.
      if (ev.target && ev.target.classList.contains("chip")) { change(i, -1); } else { change(i, +1); }
    });
    col.addEventListener("keydown", function (ev) {
      switch (ev.key) {
        case "+": case "=": case "ArrowUp": change(i, +1); break;
        case "-": case "ArrowDown": change(i, -1); break;
        case "ArrowRight": move(i, +1); break;
        case "ArrowLeft": move(i, -1); break;
        case "Home": move(i, -i); break;
        case "End": move(i, inputs.length - 1 - i); break;
        default: return;
      }
      ev.preventDefault();
    });
  });

  function move(i, d) {
    var j = Math.max(0, Math.min(inputs.length - 1, i + d));
    columns[i].col.tabIndex = -1;
    columns[j].col.tabIndex = 0;
    columns[j].col.focus();
  }

  function change(i, d) {
    var n = count(i) + d;
    if (n < 0) { return say("No chips " + labels[i] + " to take away."); }
    if (d > 0 && placed() >= total) { return say("All " + total + " chips are placed. Take one away first."); }
    inputs[i].value = n === 0 ? "" : String(n);
    inputs[i].dispatchEvent(new Event("input", { bubbles: true }));
    draw();
    var left = total - placed();
    say(n + " " + (n === 1 ? "chip " : "chips ") + labels[i] + ". " + left + " left to place.");
  }

  function say(text) { status.textContent = text; }

  // minColumn is the narrowest column, in px, whose buttons are still
  // comfortable to tap (at least 24 px wide, WCAG 2.5.8, with room for its
  // range on two lines).
  var minColumn = 32;
  function layout() {
    board.classList.remove("chips-rows");
    var cramped = columns.some(function (c) {
      var line = parseFloat(getComputedStyle(c.range).lineHeight) || 16;
      return c.col.clientWidth < minColumn || c.range.clientHeight > 2.5 * line;
    });
    board.classList.toggle("chips-rows", cramped);
  }

  function draw() {
    var most = 1;
    for (var i = 0; i < inputs.length; i++) { most = Math.max(most, count(i)); }
    // Chips shrink when a stack would grow past the board's height, or,
    // on its side, past the row's length.
    var rows = board.classList.contains("chips-rows");
    var stack = columns.length ? columns[0].stack : null;
    var room = stack ? (rows ? stack.clientWidth : stack.clientHeight) - 6 : 150;
    // A chip and the 1 px gap after it fit `most` times.
    var size = Math.max(2, Math.min(14, Math.floor((room + 1) / most) - 1));
    columns.forEach(function (c, i) {
      var n = count(i);
      while (c.stack.children.length > n) { c.stack.removeChild(c.stack.lastChild); }
      while (c.stack.children.length < n) {
        var chip = document.createElement("span");
        chip.className = "chip";
        chip.setAttribute("aria-hidden", "true");
        c.stack.appendChild(chip);
      }
      Array.prototype.forEach.call(c.stack.children, function (chip) {
        chip.style.height = rows ? "" : size + "px";
        chip.style.width = rows ? size + "px" : "";
      });
      c.col.setAttribute("aria-valuenow", String(n));
      c.col.setAttribute("aria-valuetext", n + (n === 1 ? " chip " : " chips ") + labels[i]);
    });
    var left = total - placed();
    board.setAttribute("data-left", String(left));
    counter.textContent = left >= 0
      ? placed() + " of " + total + " chips placed, " + left + " left"
      : placed() + " chips placed: " + (-left) + " more than the " + total + " allowed";
  }

  var counter = document.createElement("p");
  counter.className = "chips-counter";
  board.appendChild(counter);
  board.appendChild(grid);
  board.appendChild(status);
  if (!readonly) { board.appendChild(keys); }
  board.hidden = false;
  form.classList.add("chips-enhanced");
  // Typing in a box (still there for screen readers that prefer it)
  // redraws the board too.
  inputs.forEach(function (inp) { inp.addEventListener("input", draw); });
  layout();
  draw();
  window.addEventListener("resize", function () { layout(); draw(); });

  // A save refused for the chips as a whole (all in one or two bins)
  // marks no box, so nothing had the focus: the page stood at its top,
  // the message a screen below on a phone, and the keyboard started over
  // from the masthead. The board's column takes the focus, the message
  // read with it and in view, so the chips can be moved at once.
  var refusal = form.querySelector(".form-error");
  var focused = document.activeElement;
  if (refusal && !readonly && (!focused || focused === document.body)) {
    if (!refusal.id) { refusal.id = "chips-refusal"; }
    columns.forEach(function (c) {
      c.col.setAttribute("aria-describedby", refusal.id);
    });
    // The message stands under the board: both in view, the message at
    // the screen's foot.
    columns[0].col.focus({ preventScroll: true });
    refusal.scrollIntoView({ block: "end" });
  }
})();
