// Building DOM without HTML strings, so names from files can never become markup.

export function el(tag, props = {}, children = []) {
  const node = document.createElement(tag);
  for (const [k, v] of Object.entries(props)) {
    if (v === undefined || v === null || v === false) continue;
    if (k === "text") node.textContent = v;
    else if (k === "class") node.className = v;
    else if (k.startsWith("on")) node.addEventListener(k.slice(2), v);
    else if (k in node && typeof v !== "string") node[k] = v;
    else node.setAttribute(k, v === true ? "" : v);
  }
  for (const c of [].concat(children)) if (c !== null && c !== undefined) node.append(c);
  return node;
}

export function table(headers, rows, numeric = []) {
  return el("table", {}, [
    el("thead", {}, el("tr", {}, headers.map((h, i) => el("th", { text: h, class: numeric.includes(i) ? "n" : null })))),
    el("tbody", {}, rows.map((r) => el("tr", {}, r.map((c, i) => el("td", { text: String(c), class: numeric.includes(i) ? "n" : null }))))),
  ]);
}

/** Offers `text` to the user as a file download; nothing leaves the computer. */
export function download(name, text, type) {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const a = el("a", { href: url, download: name });
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10000);
}

/** "m:ss.cc" for a time in seconds. */
export function clockText(seconds) {
  const s = Math.max(0, seconds);
  const m = Math.floor(s / 60);
  return `${m}:${(s - m * 60).toFixed(2).padStart(5, "0")}`;
}
