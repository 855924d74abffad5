import tailwindcss from "@tailwindcss/vite";
import react from "@vitejs/plugin-react";
import { defineConfig } from "vite";

// The Express server serves /api/v1; during development Vite forwards to it so
// the browser sees one origin (the session cookie and the sw_csrf cookie stay
// same-site, and no CORS set-up is needed).
const apiTarget = `http://127.0.0.1:${process.env.STAGEWRIGHT_PORT ?? 3000}`;
const proxy = { "/api": { target: apiTarget } };

/** Matches files of the named packages inside node_modules (either path separator). */
function nodeModule(...packages: string[]): RegExp {
  const names = packages.map((p) => p.replace(/[.*+?^${}()|[\]\\]/g, "\\$&").replace("/", "[\\\\/]")).join("|");
  return new RegExp(`node_modules[\\\\/](?:${names})[\\\\/]`);
}

export default defineConfig({
  plugins: [react(), tailwindcss()],
  server: { host: "127.0.0.1", port: 5173, strictPort: true, proxy },
  preview: { host: "127.0.0.1", port: 4173, strictPort: true, proxy },
  build: {
    outDir: "dist",
    emptyOutDir: true,
    sourcemap: true,
    rolldownOptions: {
      output: {
        // Long-cached library chunks with readable names; the app itself
        // splits by route (see src/routes/router.tsx).
        codeSplitting: {
          groups: [
            {
              name: "framework",
              test: nodeModule("react", "react-dom", "scheduler", "react-router", "cookie", "set-cookie-parser", "@tanstack/query-core", "@tanstack/react-query"),
            },
            { name: "forms", test: nodeModule("react-hook-form", "@hookform/resolvers", "@standard-schema/utils") },
            { name: "zod", test: nodeModule("zod") },
            {
              name: "headlessui",
              test: nodeModule("@headlessui/react", "@floating-ui", "@react-aria", "@react-stately", "@tanstack/react-virtual", "@tanstack/virtual-core", "tabbable"),
            },
            { name: "table", test: nodeModule("@tanstack/react-table", "@tanstack/table-core") },
          ],
        },
      },
    },
  },
});
