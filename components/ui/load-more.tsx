import React from "react";
import { Button } from "@/components/ui/button";

/**
 * The "More" control under a paged list (components/data hooks answer `hasMore`, `loadingMore` and
 * `loadMore`): shown only while there is a next page.
 */
export function LoadMore({
  list,
  noun,
  testID,
}: {
  list: { hasMore: boolean; loadingMore: boolean; loadMore: () => void };
  /** What the list holds, for the label: "Show more runs". */
  noun: string;
  testID?: string;
}) {
  if (!list.hasMore) return null;
  return (
    <Button
      label={`Show more ${noun}`}
      variant="secondary"
      icon="chevron-down"
      busy={list.loadingMore}
      onPress={list.loadMore}
      style={{ alignSelf: "center" }}
      testID={testID ?? "load-more"}
    />
  );
}
