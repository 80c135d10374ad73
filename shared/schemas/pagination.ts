/**
 * Cursor pagination, one shape for every list route: `?limit=` (1 to
 * PAGE_SIZE_MAX, default PAGE_SIZE) and `?cursor=` (the `nextCursor` of the
 * previous page) in; `{ items, nextCursor }` out, `nextCursor` null on the last
 * page. A cursor is opaque: it encodes the sort key of the last item sent, so
 * a page never repeats or skips an item when others are added or removed
 * meanwhile (keyset pagination, not offsets).
 */
import { z } from "zod";

/** Items per page unless `?limit=` says otherwise. */
export const PAGE_SIZE = 50;
export const PAGE_SIZE_MAX = 200;

export const PageQuerySchema = z.object({
  cursor: z.string().min(1).max(500).optional(),
  limit: z.coerce.number().int().min(1).max(PAGE_SIZE_MAX).optional(),
});
export type PageQuery = z.infer<typeof PageQuerySchema>;

/** `{ items, nextCursor }` for a list of `item`. */
export function pageSchema<T extends z.ZodType>(item: T) {
  return z.object({ items: z.array(item), nextCursor: z.string().nullable() });
}
export type Page<T> = { items: T[]; nextCursor: string | null };
