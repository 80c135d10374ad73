import { useWindowDimensions } from "react-native";
import { WIDE_BREAKPOINT } from "./tokens";

export type Breakpoints = {
  /** Narrower than 768 px: bottom tabs, one column. */
  isPhone: boolean;
  /** 768 px or wider: side navigation, two columns where useful. */
  isWide: boolean;
  /** 1100 px or wider: room for three columns of cards. */
  isDesktop: boolean;
  width: number;
};

/** Named breakpoints from the window width, read at run time (so a phone browser gets the phone layout). */
export function breakpointsFor(width: number): Breakpoints {
  return { isPhone: width < WIDE_BREAKPOINT, isWide: width >= WIDE_BREAKPOINT, isDesktop: width >= 1100, width };
}

export function useBreakpoints(): Breakpoints {
  const { width } = useWindowDimensions();
  return breakpointsFor(width);
}
