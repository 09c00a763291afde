#include "report/whatif_assets.hpp"

namespace tocsin {

// Colours from the palette of Okabe & Ito (2008), told apart by people with
// the common colour-vision deficiencies; meaning is also carried by shape,
// fill, dash and words, never by colour alone.
namespace {

const char* const style_text = R"css(
:root { --ink: #111; --paper: #fff; --blue: #0072B2; --vermillion: #D55E00; --orange: #E69F00; --grey: #555; }
body { font: 18px/1.45 "Liberation Sans", Arial, sans-serif; color: var(--ink); background: var(--paper); margin: 0 1.2rem 2rem; }
h1 { font-size: 1.7rem; margin: 0.8rem 0 0.3rem; overflow-wrap: anywhere; }
h2 { font-size: 1.3rem; margin: 1rem 0 0.4rem; overflow-wrap: anywhere; }
.question { margin: 0 0 0.6rem; max-width: 70rem; }
.layout { display: flex; gap: 1.5rem; align-items: flex-start; }
.side { flex: 0 0 22rem; min-width: 0; position: sticky; top: 0.5rem; max-height: calc(100vh - 1rem); overflow-y: auto; }
main { flex: 1 1 auto; min-width: 0; }
@media (max-width: 900px) { .layout { display: block; } .side { position: static; max-height: none; } }
.controls { border: 2px solid var(--ink); padding: 0.4rem 0.8rem 0.8rem; }
.control { margin: 0.6rem 0; }
.control label { display: block; font-weight: bold; }
.control .key { display: block; color: var(--grey); font-size: 0.8rem; }
.control input[type=range] { width: 100%; height: 2rem; }
.control output { float: right; font-size: 1.2rem; font-weight: bold; }
select { font: inherit; width: 100%; }
:focus-visible { outline: 3px solid var(--orange); outline-offset: 2px; }
.cautions { border-left: 6px solid var(--vermillion); padding: 0.3rem 0.8rem; margin-top: 0.8rem; background: #fff4ec; font-size: 0.95rem; }
.cautions p { margin: 0.2rem 0; }
table { border-collapse: collapse; margin: 0.6rem 0; }
caption { text-align: left; font-weight: bold; padding-bottom: 0.2rem; }
th, td { border-bottom: 1px solid #999; padding: 0.25rem 0.6rem; text-align: left; vertical-align: top; }
td.number { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
th { overflow-wrap: break-word; }
.note { color: var(--grey); font-size: 0.9rem; max-width: 60rem; }
.budget { font-weight: bold; }
.within::before { content: "\2713  "; }
.over::before { content: "\2717  "; }
button.plan { font: inherit; text-align: left; background: none; border: 1px solid var(--blue); padding: 0.1rem 0.4rem; cursor: pointer; overflow-wrap: anywhere; }
#chart svg { width: 100%; max-width: 54rem; height: auto; }
#chart text { font-size: 15px; fill: var(--ink); }
@media print {
  body { font-size: 11pt; margin: 0; }
  .layout { display: block; }
  .side { position: static; max-height: none; overflow: visible; }
  .controls { display: none; }
  .cautions { background: none; }
  button.plan { border: none; padding: 0; }
  section, table { break-inside: avoid; }
}
)css";

const char* const script_text = R"js(
(function () {
  "use strict";
  var data = JSON.parse(document.getElementById("whatif-data").textContent);
  var plans = data.plans, axes = data.axes, root = document.getElementById("chart-svg");
  var SVG = root.namespaceURI;  // the page's own SVG element gives the namespace: no URL in the page
  var gridPlan = {}, sliders = [], current = 0;
  plans.forEach(function (p, i) { if (p.at.length) gridPlan[p.at.join(",")] = i; });

  function el(tag, text, cls) {
    var e = document.createElement(tag);
    if (text !== undefined) e.textContent = text;
    if (cls) e.className = cls;
    return e;
  }
  function words(s) { return s.replace(/_/g, " "); }
  function shown(s) { return s === "" ? "\u2013" : s; }
  function number(v, cls, exact) {
    var td = el("td", shown(v), "number " + cls);
    if (exact !== undefined) td.setAttribute("data-exact", exact);
    return td;
  }
  function interval(v) { return v[1] === "" ? "\u2013" : v[1] + " to " + v[2]; }
  function valueCells(tr, v) {
    tr.appendChild(number(v[0], "mean", v[3]));
    var td = number(v[1] === "" ? "" : interval(v), "interval", v[4]);
    if (v[5] !== undefined) td.setAttribute("data-exact-high", v[5]);
    tr.appendChild(td);
  }
  function budgetWords(p) { return p.budget === null ? "" : p.budget ? "within the budget" : "over the budget"; }
  function replace(node, children) {
    while (node.firstChild) node.removeChild(node.firstChild);
    children.forEach(function (c) { node.appendChild(c); });
  }
  function settingsOf(p) {
    if (!p.at.length) return axes.length ? "Not on the grid: the plan as written in the scenario" : "";
    return axes.map(function (a, k) { return a.label + " = " + a.values[p.at[k]]; }).join(", ");
  }

  function buildControls() {
    var box = document.getElementById("controls");
    axes.forEach(function (axis, a) {
      var row = el("div", undefined, "control"), id = "axis-" + a;
      var label = el("label", axis.label);
      label.htmlFor = id;
      var input = document.createElement("input");
      input.type = "range"; input.id = id; input.min = 0; input.max = axis.values.length - 1; input.step = 1;
      var out = el("output");
      out.id = id + "-value";
      out.setAttribute("for", id);
      input.addEventListener("input", function () {
        var at = sliders.map(function (s) { return Number(s.input.value); });
        var i = gridPlan[at.join(",")];
        if (i !== undefined) show(i);
      });
      row.appendChild(out);
      row.appendChild(label);
      row.appendChild(el("span", axis.key, "key"));
      row.appendChild(input);
      box.appendChild(row);
      sliders.push({ input: input, out: out, axis: axis });
    });
    var choice = document.getElementById("plan-choice");
    plans.forEach(function (p, i) {
      var o = el("option", p.name + (p.budget === null ? "" : " (" + budgetWords(p) + ")"));
      o.value = String(i);
      choice.appendChild(o);
    });
    choice.addEventListener("change", function () { show(Number(choice.value)); });
  }

  function showFigures(p) {
    replace(document.querySelector("#figures tbody"), data.figures.map(function (f, k) {
      var tr = el("tr");
      tr.setAttribute("data-metric", f.name);
      tr.appendChild(el("th", f.label));
      valueCells(tr, p.f[k]);
      return tr;
    }));
    var wards = document.getElementById("wards");
    wards.hidden = data.units.length < 2;
    var head = el("tr");
    head.appendChild(el("th", "Ward"));
    data.ward_figures.forEach(function (f) { head.appendChild(el("th", f.label)); head.appendChild(el("th", "95% interval")); });
    replace(wards.tHead, [head]);
    replace(wards.tBodies[0], data.units.map(function (u, w) {
      var tr = el("tr");
      tr.setAttribute("data-unit", String(w));
      tr.appendChild(el("th", u));
      data.ward_figures.forEach(function (f, k) { valueCells(tr, p.w[w][k]); });
      return tr;
    }));
  }

  // Plans one step away on each axis, and the nearest frontier plans on
  // either side of the selection's burden, in its comparison group.
  function neighbours(i) {
    var p = plans[i], found = [];
    if (p.at.length) axes.forEach(function (a, k) {
      [-1, 1].forEach(function (step) {
        var at = p.at.slice();
        at[k] += step;
        var j = gridPlan[at.join(",")];
        if (j !== undefined) found.push([a.label + (step < 0 ? " one step down" : " one step up"), j]);
      });
    });
    var x = Number(p.x[3]), lighter = -1, heavier = -1;
    if (p.x[3] !== "") plans.forEach(function (q, j) {
      if (j === i || !q.frontier || q.group !== p.group || q.x[3] === "") return;
      var qx = Number(q.x[3]);
      if (qx < x && (lighter < 0 || qx > Number(plans[lighter].x[3]))) lighter = j;
      if (qx >= x && (heavier < 0 || qx < Number(plans[heavier].x[3]))) heavier = j;
    });
    if (lighter >= 0) found.push(["on the frontier, next lighter", lighter]);
    if (heavier >= 0) found.push(["on the frontier, next heavier", heavier]);
    return found;
  }

  function showNeighbours(list) {
    document.getElementById("neighbour-burden").textContent = data.burden.label;
    document.getElementById("neighbour-benefit").textContent = data.benefit.label;
    replace(document.querySelector("#neighbours tbody"), list.map(function (n) {
      var q = plans[n[1]], tr = el("tr"), td = el("td"), b = el("button", q.name, "plan");
      b.type = "button";
      b.addEventListener("click", function () { show(n[1]); });
      td.appendChild(b);
      tr.appendChild(el("th", n[0]));
      tr.appendChild(td);
      tr.appendChild(number(q.x[0], "burden", q.x[3]));
      tr.appendChild(number(q.y[0], "benefit", q.y[3]));
      tr.appendChild(el("td", budgetWords(q) || "\u2013"));
      return tr;
    }));
  }

  function svg(tag, attrs, parent) {
    var e = document.createElementNS(SVG, tag);
    Object.keys(attrs).forEach(function (k) { e.setAttribute(k, attrs[k]); });
    if (parent) parent.appendChild(e);
    return e;
  }
  // Round steps of 1, 2 or 5 times a power of ten, at most six ticks.
  function ticks(lo, hi) {
    var step = Math.pow(10, Math.floor(Math.log10((hi - lo) / 5))), out = [];
    [1, 2, 5, 10].some(function (m) { if ((hi - lo) / (step * m) <= 5) { step *= m; return true; } return false; });
    for (var v = Math.ceil(lo / step) * step; v <= hi + step * 1e-9; v += step) out.push(parseFloat(v.toPrecision(6)));
    return out;
  }
  // One mark per plan of the selection's group: filled when on the frontier,
  // hollow when beaten; a square within the budget, a circle otherwise.
  function mark(g, q, px, py, r) {
    var attrs = { fill: q.frontier ? "#0072B2" : "#fff", stroke: "#0072B2", "stroke-width": 2 };
    var m = q.budget ? svg("rect", Object.assign({ x: px - r, y: py - r, width: 2 * r, height: 2 * r }, attrs), g)
                     : svg("circle", Object.assign({ cx: px, cy: py, r: r }, attrs), g);
    svg("title", {}, m).textContent = q.name;
    return m;
  }
  function drawChart(i, near) {
    var p = plans[i], W = 720, H = 420, L = 70, R = 20, T = 20, B = 60;
    var group = plans.map(function (q, j) { return j; }).filter(function (j) {
      return plans[j].group === p.group && plans[j].x[3] !== "" && plans[j].y[3] !== "";
    });
    replace(root, []);
    if (!group.length) {
      document.getElementById("chart-caption").textContent = "No plan of this group has both figures to place on the chart.";
      document.getElementById("chart-key").textContent = "";
      return;
    }
    var xs = group.map(function (j) { return Number(plans[j].x[3]); }), ys = group.map(function (j) { return Number(plans[j].y[3]); });
    var x0 = Math.min.apply(null, xs), x1 = Math.max.apply(null, xs), y0 = Math.min.apply(null, ys), y1 = Math.max.apply(null, ys);
    if (x1 === x0) { x0 -= 1; x1 += 1; }
    if (y1 === y0) { y0 -= 1; y1 += 1; }
    var padX = (x1 - x0) * 0.06, padY = (y1 - y0) * 0.08;  // no mark on an axis
    // Counts and shares start at zero: the padding never shows a negative axis.
    x0 = Math.min(x0, 0) < 0 ? x0 - padX : Math.max(0, x0 - padX); x1 += padX;
    y0 = Math.min(y0, 0) < 0 ? y0 - padY : Math.max(0, y0 - padY); y1 += padY;
    function sx(v) { return L + (v - x0) / (x1 - x0) * (W - L - R); }
    function sy(v) { return H - B - (v - y0) / (y1 - y0) * (H - T - B); }
    svg("title", {}, root).textContent = data.burden.label + " against " + data.benefit.label;
    ticks(x0, x1).forEach(function (v) {
      svg("line", { x1: sx(v), x2: sx(v), y1: T, y2: H - B, stroke: "#ddd" }, root);
      svg("text", { x: sx(v), y: H - B + 20, "text-anchor": "middle" }, root).textContent = String(v);
    });
    ticks(y0, y1).forEach(function (v) {
      svg("line", { x1: L, x2: W - R, y1: sy(v), y2: sy(v), stroke: "#ddd" }, root);
      svg("text", { x: L - 6, y: sy(v) + 5, "text-anchor": "end" }, root).textContent = String(v);
    });
    svg("text", { x: (L + W - R) / 2, y: H - 12, "text-anchor": "middle" }, root).textContent = data.burden.label + " (fewer is lighter)";
    svg("text", { x: 16, y: (T + H - B) / 2, "text-anchor": "middle", transform: "rotate(-90 16 " + (T + H - B) / 2 + ")" }, root)
      .textContent = data.benefit.label;
    var front = group.filter(function (j) { return plans[j].frontier; }).sort(function (a, b) { return xs[group.indexOf(a)] - xs[group.indexOf(b)]; });
    svg("polyline", { points: front.map(function (j) { return sx(Number(plans[j].x[3])) + "," + sy(Number(plans[j].y[3])); }).join(" "),
                      fill: "none", stroke: "#0072B2", "stroke-width": 1.5 }, root);
    var marks = svg("g", {}, root);
    group.forEach(function (j) {
      var m = mark(marks, plans[j], sx(Number(plans[j].x[3])), sy(Number(plans[j].y[3])), 5);
      m.addEventListener("click", function () { show(j); });
    });
    near.forEach(function (n) {
      var q = plans[n[1]];
      if (q.group === p.group && q.x[3] !== "" && q.y[3] !== "")
        svg("circle", { cx: sx(Number(q.x[3])), cy: sy(Number(q.y[3])), r: 11, fill: "none", stroke: "#E69F00", "stroke-width": 3, "stroke-dasharray": "4 3" }, root);
    });
    if (p.x[3] !== "" && p.y[3] !== "") {
      var cx = sx(Number(p.x[3])), cy = sy(Number(p.y[3]));
      svg("circle", { cx: cx, cy: cy, r: 15, fill: "none", stroke: "#D55E00", "stroke-width": 4 }, root);
      svg("text", { x: cx + (cx > W / 2 ? -20 : 20), y: cy - 18, "text-anchor": cx > W / 2 ? "end" : "start", "font-weight": "bold" }, root).textContent = "selected";
    }
    document.getElementById("chart-caption").textContent = (p.group && p.group !== "all plans" ? "The " + words(p.group) : "All plans") + " of the run, the selected one ringed. " +
      "On the frontier (not beaten on both): " + group.filter(function (j) { return plans[j].frontier; }).length + " of " + group.length + ".";
    document.getElementById("chart-key").textContent = "Filled mark: on the frontier (joined by the line); hollow: another plan is lighter and reaches as many. " +
      (data.budget_asked ? "Square: within the budget; circle: over it. " : "") +
      "Thick ring: the selected plan; dashed rings: its neighbours. Select a mark or a neighbour to move there.";
  }

  function show(i) {
    var p = plans[i];
    current = i;
    document.getElementById("selected-name").textContent = p.name;
    document.getElementById("selected-settings").textContent = settingsOf(p) +
      (p.channel ? (settingsOf(p) ? ". " : "") + "Channel: " + words(p.channel) + (p.unit ? ", burden counted as " + p.unit : "") + "." : "");
    var b = document.getElementById("selected-budget");
    b.textContent = p.budget === null ? "" : p.budget ? "Within the budget." : "Over the budget.";
    b.className = "budget" + (p.budget === null ? "" : p.budget ? " within" : " over");
    if (p.at.length) sliders.forEach(function (s, k) { s.input.value = p.at[k]; });
    sliders.forEach(function (s) {
      var v = s.axis.values[Number(s.input.value)];
      s.out.textContent = v;
      s.input.setAttribute("aria-valuetext", s.axis.label + " " + v);
    });
    document.getElementById("plan-choice").value = String(i);
    showFigures(p);
    var near = neighbours(i);
    showNeighbours(near);
    drawChart(i, near);
  }

  buildControls();
  show(current);
})();
)js";

}  // namespace

const std::string& whatif_style() {
    static const std::string style = style_text;
    return style;
}

const std::string& whatif_script() {
    static const std::string script = script_text;
    return script;
}

}  // namespace tocsin
