import nextVitals from "eslint-config-next/core-web-vitals";
import nextTypescript from "eslint-config-next/typescript";
import jsxA11y from "eslint-plugin-jsx-a11y";
import reactHooks from "eslint-plugin-react-hooks";

// Next.js's own rules (core web vitals, TypeScript), every React hooks rule, and jsx-a11y's recommended set.
// `npm run lint` allows no warning.
const config = [
  ...nextVitals,
  ...nextTypescript,
  {
    files: ["**/*.{ts,tsx,mts,mjs}"],
    rules: {
      ...reactHooks.configs.recommended.rules,
      ...jsxA11y.flatConfigs.recommended.rules,
      // A leading underscore marks a value left out on purpose (e.g. `const { a: _a, ...rest } = p`).
      "@typescript-eslint/no-unused-vars": [
        "warn",
        { argsIgnorePattern: "^_", varsIgnorePattern: "^_", caughtErrorsIgnorePattern: "^_", ignoreRestSiblings: true },
      ],
    },
  },
  {
    // Server components render once per request and are never re-rendered or memoised, so reading the clock there is
    // the request's time, not an impurity.
    files: ["app/**/page.tsx", "app/**/layout.tsx"],
    rules: { "react-hooks/purity": "off" },
  },
  {
    ignores: ["data/**", ".build/**", "drizzle/**", "test-results/**", "playwright-report/**", "next-env.d.ts"],
  },
];

export default config;
