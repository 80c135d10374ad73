// Icons load their font asynchronously; in component tests a plain element stands in.
jest.mock("@expo/vector-icons/Feather", () => {
  const React = require("react");
  const { Text } = require("react-native");
  const Feather = (props: { name: string }) => React.createElement(Text, props, null);
  Feather.font = {};
  return { __esModule: true, default: Feather };
});
