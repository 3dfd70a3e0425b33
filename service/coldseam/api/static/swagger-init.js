// Starts Swagger UI on the /docs page. Kept in a file of its own (not inline) so that the
// page passes the server's Content-Security-Policy: scripts only from this server.
"use strict";

window.addEventListener("load", () => {
  const root = document.getElementById("swagger-ui");
  window.ui = window.SwaggerUIBundle({
    url: root.dataset.openapiUrl,
    dom_id: "#swagger-ui",
    layout: "BaseLayout",
    deepLinking: true,
    showExtensions: true,
    showCommonExtensions: true,
    validatorUrl: null, // never ask an outside validator about our document
    presets: [window.SwaggerUIBundle.presets.apis],
  });
});
