// ESLint (flat config): Expo's shared rules for the app, the server and the engine,
// with formatting left to Prettier (`npm run format`).
const { defineConfig } = require("eslint/config");
const expoConfig = require("eslint-config-expo/flat");
const prettier = require("eslint-config-prettier");

module.exports = defineConfig([
  expoConfig,
  prettier,
  {
    ignores: ["dist/*", "data/*", "tmp/*", "drizzle/*", "public/*", ".expo/*", "node_modules/*"],
  },
  {
    files: ["**/*.ts", "**/*.tsx"],
    rules: {
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_" }],
    },
  },
  {
    // jest hoists jest.mock factories above the imports, so a factory may only reach modules with require().
    files: ["tests/components/jest-setup.ts"],
    rules: { "@typescript-eslint/no-require-imports": "off" },
  },
]);
