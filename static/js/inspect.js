// Tablet inspection pages. The live criteria come from htmx (hx-post on the form); this file only
// guards against a double signing and shows the photo about to be attached.
(function () {
  "use strict";
  document.querySelectorAll("form").forEach(function (form) {
    form.addEventListener("submit", function () {
      form.querySelectorAll("[data-lw-once]").forEach(function (button) {
        // Disable after the browser has taken the submit, so the button's own value is still sent.
        window.setTimeout(function () { button.disabled = true; }, 0);
      });
    });
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
