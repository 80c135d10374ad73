import React from "react";
import { Pressable, type PressableProps, type View } from "react-native";
import { Link, type Href } from "expo-router";

export type PressableLinkProps = Omit<PressableProps, "style" | "onPress"> & {
  href: Href;
  /** Pressable's style (a function of hovered/focused is fine). */
  style?: PressableProps["style"];
  /** Called before navigating (for example to close a menu). */
  onPress?: () => void;
  /** Replace the current history entry instead of pushing one. */
  replace?: boolean;
  children: React.ReactNode;
};

/**
 * A pressable surface that is a real link: on the web it renders `<a href>`,
 * so ctrl-click, middle-click, "open in new tab" and "copy link address" work,
 * while a plain click navigates inside the app (Expo Router's `<Link asChild>`).
 *
 * The Link's Slot merges styles as plain objects, which would drop a Pressable's
 * style function, so the style travels under another prop name to the inner
 * target.
 */
export function PressableLink({ href, style, replace, children, ...rest }: PressableLinkProps) {
  return (
    <Link href={href} replace={replace} asChild>
      <LinkTarget pressStyle={style} {...rest}>
        {children}
      </LinkTarget>
    </Link>
  );
}

type LinkTargetProps = Omit<PressableProps, "style"> & {
  pressStyle?: PressableProps["style"];
  style?: unknown;
  ref?: React.Ref<View>;
};

function LinkTarget({ pressStyle, style: _slotStyle, ref, ...props }: LinkTargetProps) {
  return <Pressable ref={ref} role="link" accessibilityRole="link" {...props} style={pressStyle} />;
}
