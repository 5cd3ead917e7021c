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
    rules: {
      // A leading underscore names what a destructuring leaves out on purpose (`const { intent: _intent, ...rest }`).
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_", ignoreRestSiblings: true }],
      // A table wider than a phone sits in a focusable region so that a keyboard can scroll it (axe: scrollable-region-focusable).
      "jsx-a11y/no-noninteractive-tabindex": ["error", { roles: ["region"], tags: [] }],
      // Containers listen for keys bubbling up from the controls inside them (the desk's arrow-key grid, Escape
      // closing a panel); the controls themselves are buttons and inputs. Clicks on non-interactive elements stay refused.
      "jsx-a11y/no-noninteractive-element-interactions": ["error", { handlers: ["onClick", "onMouseDown", "onMouseUp", "onKeyPress"] }],
      // These two prepare code for the React Compiler, which Benchpost does not use. What they flag is deliberate:
      // effects that copy a server answer (actionData, a fetcher's data) into local state once it arrives, and
      // refs read to focus or measure the element they hold.
      "react-hooks/set-state-in-effect": "off",
      "react-hooks/refs": "off",
    },
  },
);
