import type { Href } from "expo-router";
import type { IconName } from "./icon";

export type NavItem = {
  href: Href & string;
  label: string;
  icon: IconName;
  phoneTab: boolean;
  siteAdminOnly?: boolean;
};

/** The sections of the app. On a phone the first four plus "More" are tabs. */
export const NAV_ITEMS: NavItem[] = [
  { href: "/", label: "Home", icon: "home", phoneTab: true },
  { href: "/circuits", label: "Circuits", icon: "share-2", phoneTab: true },
  { href: "/programs", label: "Inputs", icon: "activity", phoneTab: true },
  { href: "/runs", label: "Runs", icon: "play-circle", phoneTab: true },
  { href: "/compare", label: "Compare", icon: "columns", phoneTab: false },
  { href: "/sweeps", label: "Sweeps", icon: "grid", phoneTab: false },
  { href: "/traces", label: "Traces", icon: "bar-chart-2", phoneTab: false },
  { href: "/lab", label: "Lab", icon: "users", phoneTab: false },
  { href: "/definitions", label: "Definitions", icon: "book-open", phoneTab: false },
  { href: "/settings", label: "Settings", icon: "settings", phoneTab: false },
  { href: "/admin", label: "Admin", icon: "shield", phoneTab: false, siteAdminOnly: true },
];

/** The sections this user may see (Admin only for site admins). */
export function navItemsFor(opts: { isSiteAdmin?: boolean } = {}): NavItem[] {
  return NAV_ITEMS.filter((i) => !i.siteAdminOnly || !!opts.isSiteAdmin);
}

export const MORE_ITEM: NavItem = { href: "/more", label: "More", icon: "menu", phoneTab: true };

/** Whether a nav item is the active section for a pathname. */
export function isActive(item: NavItem, pathname: string): boolean {
  if (item.href === "/") return pathname === "/" || pathname === "";
  if (item.href === "/more")
    return ["/more", "/compare", "/sweeps", "/traces", "/lab", "/definitions", "/settings", "/admin"].some((p) =>
      pathname.startsWith(p),
    );
  return pathname === item.href || pathname.startsWith(item.href + "/");
}
