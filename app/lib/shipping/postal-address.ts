/**
 * A postal address as Benchpost keeps it: the fields every carrier's API asks for, with the country as
 * an ISO 3166-1 alpha-2 code. How each country's fields are checked lives in `address-schema.ts`.
 */
export type PostalAddress = {
  name: string;
  line1: string;
  line2?: string | null;
  city: string;
  /** State, province or county, where the country's post uses one. */
  region?: string | null;
  postcode?: string | null;
  country: string;
  phone?: string | null;
};
