// ESLint flat config: typescript-eslint's recommended set (not type-aware, so `eslint .` stays fast),
// React's hook rules and jsx-a11y's accessibility rules, over every folder with our code.
import js from "@eslint/js";
import jsxA11y from "eslint-plugin-jsx-a11y";
import reactHooks from "eslint-plugin-react-hooks";
import globals from "globals";
import tseslint from "typescript-eslint";

export default tseslint.config(
  { ignores: ["build/", ".react-router/", "node_modules/", "drizzle/", "coverage/", "storage/", ".data/"] },
  {
    files: ["**/*.{js,ts,tsx}"],
    extends: [
      js.configs.recommended,
      ...tseslint.configs.recommended,
      reactHooks.configs.flat.recommended,
      jsxA11y.flatConfigs.recommended,
    ],
    languageOptions: { globals: { ...globals.browser, ...globals.node } },
  },
);
