import js from "@eslint/js";
import { createTypeScriptImportResolver } from "eslint-import-resolver-typescript";
import importX from "eslint-plugin-import-x";
import globals from "globals";
import tseslint from "typescript-eslint";

// Layers enforced by tooling: src and server never import each other; shared imports neither;
// the numerical core imports nothing but maths; no import cycles.
const forbid = (groups, message) => ({ "no-restricted-imports": ["error", { patterns: groups.map((group) => ({ group, message })) }] });

export default tseslint.config(
  { ignores: ["dist/**", "node_modules/**", ".data/**", ".scratch*/**", "drizzle/**", "coverage/**"] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
    plugins: { "import-x": importX },
    settings: { "import-x/resolver-next": [createTypeScriptImportResolver({ project: "./tsconfig.json" })] },
    rules: {
      "import-x/no-cycle": "error",
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_" }],
      "@typescript-eslint/consistent-type-imports": "error",
      "no-eval": "error",
      "no-new-func": "error",
    },
  },
  { files: ["src/**"], rules: forbid([["**/server/**", "express", "pg", "drizzle-orm", "drizzle-orm/*"]], "The client talks to the server over HTTP only.") },
  { files: ["server/**"], rules: forbid([["**/src/**", "react", "react-dom"]], "The server never imports client code.") },
  {
    files: ["shared/**"],
    rules: forbid([["**/src/**", "**/server/**", "react", "react-dom", "express", "pg", "drizzle-orm", "drizzle-orm/*", "node:*", "fs", "path"]], "shared/ is used by client and server alike: no I/O, no framework."),
  },
  {
    files: ["shared/demography/**"],
    rules: forbid([["**/src/**", "**/server/**", "**/schemas/**", "**/lifecycle/**", "zod", "react", "express", "pg", "drizzle-orm", "node:*"]], "The numerical core imports nothing but maths."),
  },
  { files: ["scripts/**/*.mjs"], rules: { "no-console": "off" } },
);
