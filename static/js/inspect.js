// Tablet inspection pages. The live criteria come from htmx (hx-post on the form, on load and on every input and
// change, switches and tiles included); this file guards against a double signing, clears the camera input once
// its photo is held, and shows the photo about to be attached to a signed inspection.
(function () {
  "use strict";
  document.documentElement.classList.add("lw-js");
  document.querySelectorAll("form").forEach(function (form) {
    form.addEventListener("submit", function () {
      form.querySelectorAll("[data-lw-once]").forEach(function (button) {
        // Disable after the browser has taken the submit, so the button's own value is still sent.
        window.setTimeout(function () { button.disabled = true; }, 0);
      });
    });
  });
  // Patchy Wi-Fi: when the panel cannot ask the server, say so plainly and forget the verdict it showed, so
  // signing shows the verdict first rather than signing one the panel never saw.
  function offline(event) {
    var findings = document.getElementById("lw-findings");
    var shown = document.getElementById("lw-shown");
    var source = event.detail && event.detail.elt;
    if (!findings || !source || source.id !== "lw-inspect-form") { return; }
    if (shown) { shown.value = ""; }
    var note = document.createElement("p");
    note.className = "lw-fail mb-0 lw-offline";
    note.textContent = "No connection: the criteria could not be checked. What you typed stays here; " +
      "signing shows the verdict before it records it.";
    findings.replaceChildren(note);
    var label = document.getElementById("lw-sign-verdict");
    if (label) { label.textContent = ""; }
  }
  document.body.addEventListener("htmx:sendError", offline);
  document.body.addEventListener("htmx:responseError", offline);
  document.body.addEventListener("htmx:afterRequest", function (event) {
    var source = event.detail && event.detail.elt;
    if (source && source.classList && source.classList.contains("lw-camera-input")) {
      source.value = "";  // held in the draft now: signing must not send it again
      var caption = document.getElementById("id_photo_caption");
      if (caption && event.detail.successful) { caption.value = ""; }
    }
  });
  document.querySelectorAll(".lw-photo-form input[type=file]").forEach(function (input) {
    var preview = input.form.querySelector(".lw-photo-preview");
    input.addEventListener("change", function () {
      if (!preview) { return; }
      if (preview.src) { URL.revokeObjectURL(preview.src); }
      if (input.files && input.files[0]) {
        preview.src = URL.createObjectURL(input.files[0]);
        preview.classList.remove("d-none");
      } else {
        preview.classList.add("d-none");
      }
    });
  });
})();
