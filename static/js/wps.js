// WPS draft form: the transfer mode belongs to GMAW only; hide it for the other processes.
// The review panel itself is htmx (hx-post on the form); nothing else runs here.
(function () {
  "use strict";
  const form = document.getElementById("wps-form");
  if (!form) { return; }
  const process = form.querySelector("[name=process]");
  const transfer = form.querySelector("[name=transfer]");
  if (!process || !transfer) { return; }
  const box = transfer.closest(".mb-3") || transfer.parentElement;
  function sync() {
    const gmaw = process.value === "GMAW";
    box.classList.toggle("d-none", !gmaw);
    transfer.disabled = !gmaw;
  }
  process.addEventListener("change", sync);
  sync();
})();
