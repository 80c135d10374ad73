import { useColorScheme } from "react-native";
import { darkPalette, lightPalette, radii, spacing, typeScale, fonts, type Palette } from "./tokens";

export type Theme = {
  scheme: "light" | "dark";
  colors: Palette;
  spacing: typeof spacing;
  radii: typeof radii;
  type: typeof typeScale;
  fonts: typeof fonts;
};

const light: Theme = { scheme: "light", colors: lightPalette, spacing, radii, type: typeScale, fonts };
const dark: Theme = { scheme: "dark", colors: darkPalette, spacing, radii, type: typeScale, fonts };

/** The theme for the system colour scheme (light unless the system asks for dark). */
export function useTheme(): Theme {
  const scheme = useColorScheme();
  return scheme === "dark" ? dark : light;
}
