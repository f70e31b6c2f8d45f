// @ts-check
// The work beside the footage: the switch between setting up, reviewing and reading the results,
// and the review's tabs of lists. Both are tab lists in the ARIA sense: click a tab, or move along
// them with the arrow keys, Home and End; the chosen tab's panel is shown, the others hidden.

/** @typedef {import("./store.js").PageStore} PageStore */
/** @typedef {import("./store.js").View} View */
/** @typedef {import("./store.js").ReviewTab} ReviewTab */

export class Workspace {
  /** @param {PageStore} store */
  constructor(store) {
    this.store = store;
    this.modes = tabsIn(".modes");
    this.lists = tabsIn(".tabs");
    bindTabs(this.modes, (tab) => store.viewChosen(/** @type {View} */ (tab.dataset.view)));
    bindTabs(this.lists, (tab) => store.reviewTabChosen(/** @type {ReviewTab} */ (tab.dataset.tab)));
    store.subscribe(["view"], () => {
      this.showView();
      this.topInSight();
    });
    store.subscribe(["reviewTab"], () => showChosen(this.lists, (t) => t.dataset.tab === store.reviewTab));
    this.showView();
    showChosen(this.lists, (t) => t.dataset.tab === store.reviewTab);
  }

  showView() {
    const view = this.store.view;
    showChosen(this.modes, (t) => t.dataset.view === view);
    document.body.dataset.mode = view;
  }

  /**
   * A view chosen while the page is scrolled past the switch starts at its top (Results at its
   * totals), not where the view before was scrolled to.
   */
  topInSight() {
    const tab = this.modes.find((t) => t.dataset.view === this.store.view);
    const panel = tab && document.getElementById(tab.getAttribute("aria-controls") || "");
    if (!panel) return;
    // Below the switch where it stays in sight at the top (on a laptop), else below the window's top.
    const head = this.modes[0].closest(".workspace-head");
    const under = Math.max(0, head ? head.getBoundingClientRect().bottom : 0);
    const above = panel.getBoundingClientRect().top - under;
    if (above < 0) window.scrollBy(0, above);
  }
}

/**
 * The tabs of the tab list matching `selector`.
 * @param {string} selector
 */
function tabsIn(selector) {
  return [...document.querySelectorAll(`${selector} [role=tab]`)].filter((t) => t instanceof HTMLElement);
}

/**
 * A click chooses a tab; the arrow keys, Home and End move to another and choose it.
 * @param {HTMLElement[]} tabs
 * @param {(tab: HTMLElement) => void} choose
 */
function bindTabs(tabs, choose) {
  tabs.forEach((tab, i) => {
    tab.addEventListener("click", () => choose(tab));
    tab.addEventListener("keydown", (e) => {
      const next = { ArrowRight: i + 1, ArrowLeft: i - 1, Home: 0, End: tabs.length - 1 }[e.key];
      if (next === undefined) return;
      e.preventDefault();
      const to = tabs[(next + tabs.length) % tabs.length];
      to.focus();
      choose(to);
    });
  });
}

/**
 * Marks the tab for which `isChosen` holds as selected and shows its panel; hides the others'.
 * @param {HTMLElement[]} tabs
 * @param {(tab: HTMLElement) => boolean} isChosen
 */
function showChosen(tabs, isChosen) {
  for (const tab of tabs) {
    const chosen = isChosen(tab);
    tab.setAttribute("aria-selected", String(chosen));
    tab.tabIndex = chosen ? 0 : -1;
    const panel = document.getElementById(tab.getAttribute("aria-controls") || "");
    if (panel) panel.hidden = !chosen;
  }
}
