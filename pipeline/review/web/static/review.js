// graftwork review page: row selection, keyboard shortcuts, one-click decisions, concept search. No framework.
(function () {
  "use strict";
  const token = document.querySelector('meta[name="review-token"]').content;
  const $ = (s, el) => (el || document).querySelector(s);
  const $$ = (s, el) => Array.from((el || document).querySelectorAll(s));
  const toast = (msg, bad) => {
    const t = $("#toast"); t.textContent = msg; t.className = "show" + (bad ? " bad" : "");
    clearTimeout(toast.timer); toast.timer = setTimeout(() => { t.className = ""; }, bad ? 5000 : 2200);
  };

  // --- selection (queue rows or candidates) ---------------------------------------------------------------
  const items = () => $$("#queue-table tr.row").concat($$("#cand-list li.cand"));
  let sel = -1;
  function select(i) {
    const list = items(); if (!list.length) return;
    sel = Math.max(0, Math.min(list.length - 1, i));
    list.forEach((el, j) => el.classList.toggle("sel", j === sel));
    list[sel].scrollIntoView({ block: "nearest" });
  }
  $$("#queue-table tr.row").forEach((tr) => tr.addEventListener("click", (ev) => {
    if (ev.target.closest("a")) return; location.href = tr.dataset.href;
  }));

  // --- decisions ------------------------------------------------------------------------------------------
  const cat = $("#category");
  async function decide(action, concept) {
    if (!cat) return;
    const body = { action, concept: concept || "", source: cat.dataset.source, category: cat.dataset.code,
                   note: ($("#note") || {}).value || "" };
    $$("button.act, .hits button").forEach((b) => { b.disabled = true; });
    let res, data;
    try {
      res = await fetch("/api/decide", { method: "POST", headers: { "Content-Type": "application/json",
        "X-Review-Token": token }, body: JSON.stringify(body) });
      data = await res.json();
    } catch (e) { data = { error: String(e) }; res = { ok: false }; }
    $$("button.act, .hits button").forEach((b) => { b.disabled = false; });
    if (!res.ok) { toast(data.error || "failed", true); return; }
    toast(data.status === "queued" ? "Queued: " + data.message : "Stored: " + action + " " + (concept || ""));
    document.body.dataset.lastDecision = data.status;
    const next = cat.dataset.next;
    setTimeout(() => { location.href = (action === "reopen" || !next) ? location.href : next; }, 600);
  }
  $$("button.act").forEach((b) => b.addEventListener("click", () => decide(b.dataset.action, b.dataset.concept)));

  // --- concept search (remap) -----------------------------------------------------------------------------
  const box = $("#remap-search"), hits = $("#remap-results");
  let timer = null;
  if (box) box.addEventListener("input", () => {
    clearTimeout(timer);
    timer = setTimeout(async () => {
      const q = box.value.trim(); hits.innerHTML = "";
      if (!q) return;
      const found = await (await fetch("/api/concepts?q=" + encodeURIComponent(q))).json();
      for (const n of found) {
        const li = document.createElement("li");
        const b = document.createElement("button"); b.textContent = "Map here"; b.dataset.concept = n.code;
        b.addEventListener("click", () => decide("remap", n.code));
        const code = document.createElement("span"); code.className = "code"; code.textContent = n.code;
        const path = document.createElement("div"); path.className = "cpath"; path.textContent = n.path;
        li.append(b, code, " " + n.label, path); hits.append(li);
      }
      if (!found.length) hits.innerHTML = '<li class="muted">no concept matches</li>';
    }, 180);
  });

  // --- keyboard -------------------------------------------------------------------------------------------
  document.addEventListener("keydown", (ev) => {
    const typing = ev.target.matches("input, textarea, select");
    if (ev.key === "Escape") {
      if (typing) { ev.target.blur(); return; }
      if (!$("#help").hidden) { $("#help").hidden = true; return; }
      if (cat) location.href = cat.dataset.back; return;
    }
    if (typing || ev.ctrlKey || ev.metaKey || ev.altKey) return;
    const list = items(), cur = list[sel];
    switch (ev.key) {
      case "j": case "ArrowDown": select(sel + 1); break;
      case "k": case "ArrowUp": select(sel - 1); break;
      case "Enter": if (cur && cur.dataset.href) location.href = cur.dataset.href; break;
      case "a": case "r": {
        const c = cur && cur.dataset.concept ? cur : list[0];
        if (c && c.dataset.concept) decide(ev.key === "a" ? "accept" : "reject", c.dataset.concept);
        break;
      }
      case "o": if (cat) decide("reopen", ""); break;
      case "n": if (cat && cat.dataset.next) location.href = cat.dataset.next; break;
      case "/": ev.preventDefault(); (box || $("#concept-search")).focus(); break;
      case "?": $("#help").hidden = !$("#help").hidden; break;
      default: return;
    }
  });
  if (items().length) select(0);
})();
