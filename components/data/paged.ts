/**
 * Every list route answers one page at a time (`{ items, nextCursor }`, shared/schemas/pagination.ts).
 * `usePagedQuery` fetches a list page by page with an infinite query keyed by the resource's
 * `lists()` factory; its answer has the items of every page loaded so far and `loadMore`
 * (components/ui/load-more.tsx shows the control).
 */
import {
  useInfiniteQuery,
  type InfiniteData,
  type UseInfiniteQueryResult,
  type UseQueryResult,
} from "@tanstack/react-query";
import { useMemo } from "react";
import type { ZodType } from "zod";
import { api } from "./api";
import type { Page } from "@/shared/schemas/pagination";

/** A list hook's answer: the items of every page loaded so far, and a way to load the next page. */
export type PagedList<T> = UseQueryResult<T[], Error> & {
  /** Load the next page (nothing when there is none). */
  loadMore: () => void;
  hasMore: boolean;
  loadingMore: boolean;
};

/** Flattens an infinite query over `{ items, nextCursor }` pages into a list hook's answer. */
export function usePagedList<T>(q: UseInfiniteQueryResult<InfiniteData<Page<T>>, Error>): PagedList<T> {
  const pages = q.data?.pages;
  const data = useMemo(() => pages?.flatMap((p) => p.items), [pages]);
  return {
    ...q,
    data,
    loadMore: () => {
      if (q.hasNextPage && !q.isFetchingNextPage) void q.fetchNextPage();
    },
    hasMore: !!q.hasNextPage,
    loadingMore: q.isFetchingNextPage,
  } as unknown as PagedList<T>;
}

/** `path` with `params` and the page's cursor as its query string. */
export function pagePath(path: string, params: Record<string, string | undefined>, cursor: string | undefined): string {
  const qs = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined) qs.set(k, v);
  if (cursor) qs.set("cursor", cursor);
  const s = qs.toString();
  return s ? `${path}?${s}` : path;
}

/** A paged list: GET `path` (with `params`) page by page, each page parsed with `schema`. */
export function usePagedQuery<T, P extends Page<T> = Page<T>>(opts: {
  queryKey: readonly unknown[];
  path: string;
  params?: Record<string, string | undefined>;
  schema: ZodType<P>;
  enabled?: boolean;
}): PagedList<T> & { firstPage: P | undefined } {
  const q = useInfiniteQuery({
    queryKey: opts.queryKey,
    initialPageParam: undefined as string | undefined,
    queryFn: ({ pageParam, signal }) =>
      api(pagePath(opts.path, opts.params ?? {}, pageParam), { schema: opts.schema, signal }),
    getNextPageParam: (last: P) => last.nextCursor ?? undefined,
    enabled: opts.enabled ?? true,
  });
  const list = usePagedList<T>(q as unknown as UseInfiniteQueryResult<InfiniteData<Page<T>>, Error>);
  return { ...list, firstPage: q.data?.pages[0] } as PagedList<T> & { firstPage: P | undefined };
}

/**
 * A picker's options: the pages loaded so far, plus the chosen item when it is not among them
 * (chosen by link from a later page), so the choice always shows what is selected.
 */
export function pickerOptions(
  items: readonly { id: string; name: string }[] | undefined,
  selected: { id: string; name: string } | undefined,
): { value: string; label: string }[] {
  const list = (items ?? []).map((i) => ({ value: i.id, label: i.name }));
  if (selected && !list.some((o) => o.value === selected.id)) list.push({ value: selected.id, label: selected.name });
  return list;
}
