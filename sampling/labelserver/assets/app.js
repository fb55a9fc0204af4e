// The labeling page of probity label. It talks only to the server it came
// from (the Content-Security-Policy allows nothing else), shows one item
// at a time, and sends each label, note and correction as one event; the
// server confirms an event only once it is in the audit trail on disk.
"use strict";

(function () {
  const csrf = document.querySelector('meta[name="csrf-token"]').content;
  const $ = (id) => document.getElementById(id);
  const st = { classes: [], sequence: [], labeled: 0, total: 0, pos: 0, item: null, offer: 0, mode: "idle", pending: null };

  async function api(method, path, body) {
    const opts = { method, credentials: "same-origin", headers: {} };
    if (body !== undefined) {
      opts.headers["Content-Type"] = "application/json";
      opts.headers["X-CSRF-Token"] = csrf;
      opts.body = JSON.stringify(body);
    }
    const resp = await fetch(path, opts);
    let data = {};
    try { data = await resp.json(); } catch (e) { data = {}; }
    if (!resp.ok) {
      const err = new Error(data.error || ("the server answered " + resp.status));
      err.status = resp.status;
      throw err;
    }
    return data;
  }

  function show(id, on) { $(id).hidden = !on; }

  function message(text) {
    $("message").textContent = text || "";
    show("message", !!text);
  }

  function count() {
    $("count").textContent = "Labeled " + st.labeled + " of " + st.total;
  }

  function keyHints() {
    const f = $("keys");
    f.textContent = "";
    const add = (key, what) => {
      const span = document.createElement("span");
      span.className = "hintkey";
      const k = document.createElement("kbd");
      k.textContent = key;
      span.append(k, " " + what);
      f.append(span);
    };
    st.classes.forEach((c, i) => { if (i < 9) add(String(i + 1), c); });
    add("u", "unsure");
    add("n", "note");
    add("←", "previous");
    add("→", "next");
    if (st.spares) add("s", "go to the spare offered");
    show("keys", true);
  }

  function buttons() {
    const b = $("buttons");
    b.textContent = "";
    const add = (key, text, fn, cls) => {
      const btn = document.createElement("button");
      btn.type = "button";
      btn.className = cls || "";
      const k = document.createElement("kbd");
      k.textContent = key;
      btn.append(k, " " + text);
      btn.addEventListener("click", fn);
      b.append(btn);
    };
    st.classes.forEach((c, i) => { if (i < 9) add(String(i + 1), c, () => setLabel(c), "cls"); });
    add("u", "unsure", () => setLabel("unsure"), "unsure");
    add("n", "note", openNote, "aux");
    add("←", "previous", () => go(st.pos - 1), "aux");
    add("→", "next", () => go(st.pos + 1), "aux");
  }

  function render() {
    const it = st.item;
    show("done", false);
    show("item", true);
    $("pos").textContent = (st.pos + 1) + " / " + st.total;
    $("itemno").textContent = "Item " + it.item;
    $("recid").textContent = "record " + it.record_id;
    if (it.spare_for) {
      $("sparefor").textContent = "spare, replacing item " + it.spare_for;
      show("sparefor", true);
    } else {
      show("sparefor", false);
    }
    const dl = $("fields");
    dl.textContent = "";
    for (const f of it.fields) {
      const dt = document.createElement("dt");
      dt.textContent = f.name;
      const dd = document.createElement("dd");
      if (f.image) {
        const img = document.createElement("img");
        img.src = f.image;
        img.alt = f.value;
        const cap = document.createElement("span");
        cap.className = "caption";
        cap.textContent = f.value;
        dd.append(img, cap);
      } else {
        dd.textContent = f.value;
      }
      dl.append(dt, dd);
    }
    $("curlabel").textContent = it.label || "not labeled";
    $("curlabel").className = it.label === "unsure" ? "unsure" : (it.label ? "set" : "unset");
    $("curby").textContent = it.labeler ? "by " + it.labeler : "";
    $("curnote").textContent = it.note ? "Note: " + it.note : "";
    show("curnote", !!it.note);
    document.querySelectorAll("#buttons button.cls, #buttons button.unsure").forEach((btn) => {
      btn.classList.toggle("chosen", btn.textContent.slice(2) === it.label);
    });
    if (st.offer && it.item !== st.offer) {
      show("offer", true);
    } else {
      st.offer = 0;
      show("offer", false);
    }
    count();
  }

  // nextUnlabeled is the position of the first item not labeled after
  // from, else from the top (-1 when every item is labeled).
  function nextUnlabeled(from) {
    for (let i = from + 1; i < st.sequence.length; i++) if (!st.sequence[i].labeled) return i;
    for (let i = 0; i <= from && i < st.sequence.length; i++) if (!st.sequence[i].labeled) return i;
    return -1;
  }

  function showDone() {
    st.pos = st.total;
    show("item", false);
    show("done", true);
    count();
  }

  async function go(pos) {
    if (st.mode !== "idle") return;
    if (pos < 0) return;
    if (pos >= st.total) {
      if (st.labeled === st.total) showDone();
      return;
    }
    try {
      st.item = await api("GET", "api/item/" + st.sequence[pos].item);
      st.pos = pos;
      message("");
      render();
    } catch (e) {
      message(e.message);
    }
  }

  function setLabel(label) {
    if (st.mode !== "idle" || !st.item) return;
    const it = st.item;
    if (it.label === label) { const next = nextUnlabeled(st.pos); if (next < 0) showDone(); else go(next); return; }
    if (it.label) {
      st.pending = label;
      st.mode = "reason";
      $("reason-label").textContent = "Reason for changing \u201c" + it.label + "\u201d to \u201c" + (label || "not labeled") + "\u201d (required, kept in the audit trail)";
      $("reason-input").value = "";
      show("reason", true);
      $("reason-input").focus();
      return;
    }
    submit(label, it.note, "");
  }

  async function submit(label, note, reason) {
    const it = st.item;
    try {
      const r = await api("POST", "api/label", {
        item: it.item, label: label, note: note, previous_label: it.label, previous_note: it.note, reason: reason,
      });
      st.item = r.item;
      if (r.sequence) {
        st.sequence = r.sequence;
      } else {
        const e = st.sequence.find((x) => x.item === r.item.item);
        if (e) e.labeled = r.item.label !== "";
      }
      st.labeled = r.labeled;
      st.total = r.total;
      st.pos = Math.max(0, st.sequence.findIndex((e) => e.item === r.item.item));
      message("");
      if (r.offer) {
        st.offer = r.offer;
        $("offer").textContent = "Item " + it.item + " is marked unsure. Spare item " + r.offer + " replaces it \u2014 press s to label it.";
      } else if (r.no_spare) {
        st.offer = 0;
        message("Item " + it.item + " is marked unsure. No spare is left to replace it: it stays unsure.");
      }
      render();
      if (r.offer) show("offer", true);
      // A class label moves on to the next item still to label (after a
      // spare, back to where the labeler was); unsure stays, to offer the
      // spare; a note or a cleared label stays too.
      if (label !== "" && label !== "unsure" && note === it.note) {
        const next = nextUnlabeled(st.pos);
        if (next < 0) showDone(); else go(next);
      }
    } catch (e) {
      message(e.message);
      if (e.status === 409) {
        try { st.item = await api("GET", "api/item/" + it.item); render(); message(e.message); } catch (e2) { /* keep the message */ }
      }
    }
  }

  function openNote() {
    if (st.mode !== "idle" || !st.item) return;
    st.mode = "note";
    $("note").value = st.item.note;
    show("notebox", true);
    $("note").focus();
  }

  function closePanels() {
    st.mode = "idle";
    st.pending = null;
    show("reason", false);
    show("notebox", false);
    document.activeElement && document.activeElement.blur();
  }

  $("reason-input").addEventListener("keydown", (e) => {
    if (e.key === "Escape") { e.preventDefault(); closePanels(); }
  });
  $("reason").addEventListener("submit", (e) => {
    e.preventDefault();
    const reason = $("reason-input").value.trim();
    if (!reason) { message("Give the reason for the change."); return; }
    const label = st.pending;
    closePanels();
    submit(label, st.item.note, reason);
  });
  $("note").addEventListener("keydown", (e) => {
    if (e.key === "Escape") { e.preventDefault(); closePanels(); return; }
    if (e.key === "Enter" && !e.shiftKey) {
      e.preventDefault();
      const note = $("note").value;
      closePanels();
      if (note !== st.item.note) submit(st.item.label, note, "");
    }
  });
  $("notebox").addEventListener("submit", (e) => e.preventDefault());

  document.addEventListener("keydown", (e) => {
    if (st.mode !== "idle" || e.ctrlKey || e.metaKey || e.altKey) return;
    const t = e.target;
    if (t && (t.tagName === "INPUT" || t.tagName === "TEXTAREA")) return;
    if ($("item").hidden && $("done").hidden) return;
    const k = e.key;
    if (/^[1-9]$/.test(k) && Number(k) <= st.classes.length) { e.preventDefault(); setLabel(st.classes[Number(k) - 1]); return; }
    switch (k) {
      case "u": case "U": e.preventDefault(); setLabel("unsure"); break;
      case "n": case "N": e.preventDefault(); openNote(); break;
      case "ArrowRight": e.preventDefault(); go($("done").hidden ? st.pos + 1 : st.total); break;
      case "ArrowLeft": e.preventDefault(); go($("done").hidden ? st.pos - 1 : st.total - 1); break;
      case "s": case "S":
        if (st.offer) {
          e.preventDefault();
          const i = st.sequence.findIndex((x) => x.item === st.offer);
          if (i >= 0) go(i);
        }
        break;
    }
  });

  $("start-form").addEventListener("submit", async (e) => {
    e.preventDefault();
    try {
      await api("POST", "api/labeler", { name: $("name").value });
      start();
    } catch (err) {
      message(err.message);
    }
  });

  async function start() {
    try {
      const s = await api("GET", "api/state");
      st.classes = s.classes;
      st.spares = s.spares;
      st.sequence = s.sequence;
      st.labeled = s.labeled;
      st.total = s.total;
      count();
      if (!s.labeler) {
        show("start", true);
        $("name").focus();
        return;
      }
      show("start", false);
      $("who").textContent = "Labeler: " + s.labeler;
      buttons();
      keyHints();
      if (s.resume >= s.total) { showDone(); return; }
      await go(s.resume);
    } catch (e) {
      message(e.message);
      show("item", true);
    }
  }

  start();
})();
