(function () {
  var errs = [];
  function rec(msg) {
    errs.push(String(msg));
    try { document.documentElement.setAttribute("data-errors", errs.join(" | ")); } catch (e) {}
  }
  window.__reportError = rec;
  window.onerror = function (msg, src, line, col) { rec(msg + " (line " + line + ":" + col + ")"); return false; };
  window.addEventListener("unhandledrejection", function (ev) { rec("unhandled rejection: " + ev.reason); });
  document.addEventListener("securitypolicyviolation", function (ev) { rec("blocked by policy: " + ev.violatedDirective + " " + ev.blockedURI); });
  var ce = console.error;
  console.error = function () { rec(Array.prototype.join.call(arguments, " ")); if (ce) { ce.apply(console, arguments); } };
})();
