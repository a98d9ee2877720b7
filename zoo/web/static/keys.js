// Keyboard: "/" focuses the query box (or opens the search page); Escape leaves it.
document.addEventListener("keydown", (event) => {
  const target = event.target;
  const typing = target instanceof HTMLInputElement || target instanceof HTMLTextAreaElement;
  if (event.key === "/" && !typing && !event.ctrlKey && !event.metaKey && !event.altKey) {
    const box = document.getElementById("q");
    event.preventDefault();
    if (box) { box.focus(); box.select(); } else { window.location.assign("/search"); }
  } else if (event.key === "Escape" && typing) {
    target.blur();
  }
});
