/**
 * Pieces of the zod schemas that pages use for their search parameters (`readSearchParams` on the
 * server answers 400 when a URL fails its page's schema).
 */
import { z } from "zod";
import { storableText } from "./storable-text";

/** More pages than any table of a course has (100,000 pages of 25 is 2.5 million rows); a page past the last shows none. */
export const MAX_PAGE = 100_000;
export const pageNumber = z.coerce.number().int().min(1).max(MAX_PAGE);

/** `?page=…&size=…` of a paged table: size between 5 and 200 rows. */
export const pagingSearch = (defaultSize = 25) => ({
  page: pageNumber.default(1),
  size: z.coerce.number().int().min(5).max(200).default(defaultSize),
});

/** What someone typed into a search box. */
export const searchText = (maxLength: number) => storableText.trim().max(maxLength).optional();
