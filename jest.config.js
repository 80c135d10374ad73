/** Component tests (jest-expo). Node's test runner handles everything else. */
module.exports = {
  preset: "jest-expo",
  testMatch: ["<rootDir>/tests/components/**/*.test.tsx"],
  transformIgnorePatterns: [
    "node_modules/(?!((jest-)?react-native|@react-native(-community)?|expo(nent)?|@expo(nent)?/.*|@expo-google-fonts/.*|react-navigation|@react-navigation/.*|react-native-svg|victory-native|@shopify/react-native-skia|@tanstack/.*|standard-navigation))",
  ],
  moduleNameMapper: { "^@/(.*)$": "<rootDir>/$1" },
  setupFilesAfterEnv: ["<rootDir>/tests/components/jest-setup.ts"],
};
