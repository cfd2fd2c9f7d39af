// Runs from the page's <head> (scripts/preload-web.ts copies it into the web build), before the app's
// scripts have downloaded: starts the reads the first screen waits for, so their answers are in hand
// when the app first renders instead of one round trip after it. The app adopts each answer once
// (components/data/api.ts, takeEarlyRead); a signed-out visitor's 401 is adopted the same way and
// sends them to sign-in. Plain ES5-level script, not bundled: keep it tiny.
(function () {
  var reads = {};
  function start(path) {
    try {
      var answer = fetch('/api' + path, { credentials: 'same-origin', headers: { Accept: 'application/json' } });
      answer.catch(function () {});
      reads[path] = answer;
    } catch (e) {}
  }
  // Who is signed in, on every page of the app.
  start('/me');
  // The worklist's first page, on its own address without filters (components/data/first-screen.ts
  // asks for the same page under the same conditions).
  var filters = ['q', 'state', 'operator', 'when'];
  var params = new URLSearchParams(location.search);
  if (location.pathname === '/' && !filters.some(function (k) { return params.has(k); })) start('/studies?limit=25');
  window.__isobarEarlyReads = reads;
})();
