// @ts-check
// The messages under the picture: one per key, so a new one replaces an old one about the same
// thing; each can be dismissed.

import { el } from "./dom.js";

/** @typedef {"ok" | "warn" | "error"} Tone */

export class Messages {
  /** @param {HTMLElement} root */
  constructor(root) {
    this.root = root;
  }

  /**
   * Shows a message about `key`, replacing any earlier one about it.
   * @param {string} key
   * @param {Tone} tone
   * @param {string} text
   * @param {Node[]} [extra] buttons or code after the text
   */
  say(key, tone, text, extra = []) {
    this.clear(key);
    const dismiss = el("button", { type: "button", class: "dismiss", text: "\u2715", "aria-label": "Dismiss", onclick: () => this.clear(key) });
    this.root.append(el("div", { class: `message ${tone}`, "data-key": key }, [dismiss, text, ...extra]));
  }

  /** @param {string} key */
  clear(key) {
    for (const m of this.root.querySelectorAll(".message")) if (m instanceof HTMLElement && m.dataset.key === key) m.remove();
  }
}

/**
 * A core message without its pointer to the repository's documentation, which the page (one
 * offline file) does not carry.
 * @param {string} message
 */
export function withoutDocs(message) {
  return message.replace(/ \(see docs\/[\w.-]+\)/g, "");
}
