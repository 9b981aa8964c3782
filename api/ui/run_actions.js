// @ts-check
/// <reference lib="dom" />
/**
 * What a run view offers beside its result: a running run's progress bar (fed by its event
 * stream, or polled when the tab sends a key) with cancel, and a finished run's replay.
 *
 * @module
 */
import { callout, h, metaList } from "./dom.js";
import { apiKey, call, problemBox } from "./service.js";
import { onLeave, redrawIfCurrent } from "./shell.js";

/** Run states that never change. */
export const FINAL = new Set(["succeeded", "failed", "cancelled"]);

/**
 * Progress bar fed by the run's event stream, with cancel.
 * @param {number} gen
 * @param {any} run
 */
export function liveProgress(gen, run) {
  const bar = /** @type {HTMLProgressElement} */ (h("progress", {
    id: "run-progress",
    max: "1",
    value: String(run.progress ?? 0),
    "aria-label": "Run progress",
  }));
  const text = h(
    "span",
    { id: "run-progress-text", class: "muted" },
    `${run.status} · ${Math.round((run.progress ?? 0) * 100)} %`,
  );
  const cancel = h("button", {
    type: "button",
    class: "ghost",
    id: "cancel",
    onclick: async () => {
      cancel.setAttribute("disabled", "");
      const res = await call({ method: "POST", path: `/v1/runs/${run.id}/cancel` });
      if (!res.ok) box.append(problemBox(res.data, "Could not cancel"));
    },
  }, "Cancel run");
  const box = h("div", { class: "panel" }, h("div", { class: "progress" }, bar, text, cancel));
  let done = false;
  const finish = () => {
    if (done) return;
    done = true;
    redrawIfCurrent(gen);
  };
  /** @param {MessageEvent} e */
  const onEvent = (e) => {
    let d;
    try {
      d = JSON.parse(e.data);
    } catch {
      return;
    }
    if (typeof d.progress === "number") {
      bar.value = d.progress;
      const eta = typeof d.eta_seconds === "number"
        ? ` · about ${Math.max(0, Math.round(d.eta_seconds))} s left`
        : "";
      text.textContent = `${d.status ?? "running"} · ${Math.round(d.progress * 100)} %${eta}`;
    }
    if (FINAL.has(d.status)) {
      es?.close();
      finish();
    }
  };
  // An EventSource cannot send the key: with a key, the page polls the run instead.
  const es = apiKey() ? null : new EventSource(`/v1/runs/${run.id}/events`);
  es?.addEventListener("progress", onEvent);
  es?.addEventListener("status", onEvent);
  // If the stream drops, fall back to polling the run until it finishes.
  const poller = () => {
    if (done) return;
    es?.close();
    const poll = setInterval(async () => {
      const r = await call({ method: "GET", path: `/v1/runs/${run.id}` });
      if (r.ok) onEvent(new MessageEvent("status", { data: JSON.stringify(r.data) }));
      if (!r.ok || FINAL.has(r.data.status)) {
        clearInterval(poll);
        finish();
      }
    }, 1000);
    onLeave(() => clearInterval(poll));
  };
  if (es) es.onerror = poller;
  else poller();
  onLeave(() => {
    done = true;
    es?.close();
  });
  return box;
}

/** @param {string} path */
export function replayPanel(path) {
  const out = h("div", { id: "replay-result", "aria-live": "polite" });
  const button = h("button", {
    type: "button",
    id: "replay",
    onclick: async () => {
      button.setAttribute("disabled", "");
      out.replaceChildren(h("p", { class: "muted" }, "Recomputing from the stored inputs…"));
      const r = await call({ method: "POST", path: `${path}/replay` });
      button.removeAttribute("disabled");
      if (!r.ok) return out.replaceChildren(problemBox(r.data, "Replay failed"));
      const d = r.data;
      const digests = metaList([
        ["Stored digest", h("code", null, d.stored_digest)],
        ["Replay digest", h("code", null, d.replay_digest ?? "none")],
        [
          "Algorithm version",
          d.algorithm_version
            ? `${d.algorithm_version.recorded} recorded, ${d.algorithm_version.current} now`
            : null,
        ],
      ]);
      out.replaceChildren(
        d.identical
          ? callout(
            "ok",
            "Verified: the replay reproduced the stored result byte for byte",
            h("p", { class: "verified", "data-verified": "true" }, "verified"),
            digests,
            d.note ? h("p", null, d.note) : null,
          )
          : callout(
            "bad",
            "Not verified: the replay gave a different result",
            h("p", { class: "verified", "data-verified": "false" }, "not verified"),
            digests,
            d.note ? h("p", null, d.note) : null,
          ),
      );
    },
  }, "Replay and verify");
  return h(
    "div",
    { class: "panel" },
    h(
      "div",
      { class: "actions" },
      button,
      h(
        "span",
        { class: "muted" },
        "Recompute from the stored inputs and compare the result digests.",
      ),
    ),
    out,
  );
}
