// One lint configuration for the whole workspace.
import js from "@eslint/js";
import tseslint from "typescript-eslint";
import reactHooks from "eslint-plugin-react-hooks";
import globals from "globals";
import oneWay from "./eslint-rules/one-way-imports.js";
import routesCallDomain from "./eslint-rules/routes-call-domain.js";

const house = { rules: { ...oneWay.rules, ...routesCallDomain.rules } };

export default tseslint.config(
  {
    ignores: [
      "**/dist/**",
      "**/node_modules/**",
      "**/.turbo/**",
      "apps/api/drizzle/**",
      "**/test-results/**",
    ],
  },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
    rules: {
      "@typescript-eslint/no-explicit-any": "error",
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_" }],
      "@typescript-eslint/consistent-type-imports": "error",
    },
  },
  {
    files: ["apps/web/src/**/*.{ts,tsx}", "packages/*/src/**/*.ts", "apps/api/src/**/*.ts"],
    plugins: { house },
    rules: { "house/one-way-imports": "error" },
  },
  {
    files: ["apps/api/src/routes/**/*.ts"],
    plugins: { house },
    rules: { "house/routes-call-domain": "error" },
  },
  {
    // The demo seeder builds its data through the domain functions, inside the one transaction it opens.
    files: ["apps/api/src/demo/**/*.ts"],
    plugins: { house },
    rules: { "house/routes-call-domain": ["error", { allow: ["transaction"] }] },
  },
  {
    files: ["apps/web/**/*.{ts,tsx}"],
    plugins: { "react-hooks": reactHooks },
    rules: {
      "react-hooks/rules-of-hooks": "error",
      "react-hooks/exhaustive-deps": "warn",
    },
  },
);
