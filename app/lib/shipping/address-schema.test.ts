import { describe, expect, it } from "vitest";
import { countryCodes, postalAddressSchema } from "./address-schema";

const base = { name: "Ada Student", line1: "1 Bench Lane", city: "Fernwick" };

/** The message at each field, for one address. */
function problems(input: Record<string, unknown>): Record<string, string> {
  const result = postalAddressSchema.safeParse(input);
  if (result.success) return {};
  return Object.fromEntries(result.error.issues.map((issue) => [issue.path.join("."), issue.message]));
}

const parse = (input: Record<string, unknown>) => postalAddressSchema.parse(input);

describe("postal address: required fields", () => {
  it("names each missing field, all at once, postcode and state included", () => {
    expect(problems({ name: "  ", line1: "", country: "US", postcode: "1234" })).toEqual({
      name: "Enter the name to put on the parcel.",
      line1: "Enter the street and number.",
      city: "Enter the town or city.",
      postcode: "“1234” is not a postcode there; write it like 12345 or 12345-6789.",
      region: "Enter the state as its code, such as NY.",
    });
  });

  it("refuses what is not an address at all, without reading a country's rule", () => {
    expect(postalAddressSchema.safeParse(null).success).toBe(false);
    expect(postalAddressSchema.safeParse("1 Bench Lane").success).toBe(false);
  });

  it("refuses a country that is not an ISO 3166-1 alpha-2 code", () => {
    expect(problems({ ...base, country: "XX" })).toEqual({
      country: "Give the country as its two-letter code (ISO 3166-1), such as DE or US.",
    });
    expect(problems({ ...base, country: "Germany" })).toHaveProperty("country");
    expect(problems({ ...base, country: "UK" })).toHaveProperty("country");
    expect(problems({ ...base })).toEqual({ country: "Choose the country." });
  });

  it("trims, upper-cases country and postcode, and keeps blank optional fields as null", () => {
    expect(
      parse({ name: " Ada ", line1: " 1 Bench Lane ", line2: "  ", city: "Lyon", postcode: "69001", country: "fr", phone: "" }),
    ).toEqual({
      name: "Ada",
      line1: "1 Bench Lane",
      line2: null,
      city: "Lyon",
      region: null,
      postcode: "69001",
      country: "FR",
      phone: null,
    });
  });

  it("refuses text PostgreSQL cannot keep, and a phone number with letters", () => {
    expect(problems({ ...base, country: "DE", postcode: "10117", line2: "a\u0000b" })).toHaveProperty("line2");
    expect(problems({ ...base, country: "DE", postcode: "10117", phone: "call me" })).toEqual({
      phone: "Write the phone number with digits, spaces and + ( ) - only.",
    });
    expect(parse({ ...base, country: "DE", postcode: "10117", phone: "+49 30 1234-567" }).phone).toBe("+49 30 1234-567");
  });

  it("refuses a name longer than a label holds", () => {
    expect(problems({ ...base, name: "x".repeat(121), country: "DE", postcode: "10117" })).toEqual({
      name: "Keep this under 120 characters.",
    });
  });
});

// Each case: [country, postcode, region, the postcode written back, or null when refused at postcode/region].
describe.each([
  // USPS Publication 28: ZIP 5 or ZIP+4, a state abbreviation
  ["US", "12345", "ny", "12345", "NY"],
  ["US", "12345-6789", "CA", "12345-6789", "CA"],
  ["US", "1234", "NY", null, "NY"],
  ["US", "123456789", "NY", null, "NY"],
  ["US", "12345", "ZZ", "12345", null],
  // Canada Post: A1A 1A1, no D F I O Q U, no W or Z first; a province symbol
  ["CA", "k1a0b1", "on", "K1A 0B1", "ON"],
  ["CA", "H2X 1Y4", "QC", "H2X 1Y4", "QC"],
  ["CA", "D1A 0B1", "ON", null, "ON"],
  ["CA", "W1A 0B1", "ON", null, "ON"],
  ["CA", "K1A 0B1", "Ontario", "K1A 0B1", null],
  // Royal Mail
  ["GB", "sw1a1aa", "", "SW1A 1AA", ""],
  ["GB", "M1 1AE", "", "M1 1AE", ""],
  ["GB", "B33 8TH", "", "B33 8TH", ""],
  ["GB", "CR2 6XH", "", "CR2 6XH", ""],
  ["GB", "GIR 0AA", "", "GIR 0AA", ""],
  ["GB", "Q1 1AA", "", null, ""],
  ["GB", "SW1A 1CA", "", null, ""],
  ["GB", "12345", "", null, ""],
  // Eircode
  ["IE", "d02x285", "", "D02 X285", ""],
  ["IE", "D6W 1234", "", "D6W 1234", ""],
  ["IE", "B02 X285", "", null, ""],
  ["IE", "D02 X28", "", null, ""],
  // Deutsche Post, La Poste
  ["DE", "10117", "", "10117", ""],
  ["DE", "1011", "", null, ""],
  ["FR", "75008", "", "75008", ""],
  ["FR", "750080", "", null, ""],
  // PostNL
  ["NL", "1012ab", "", "1012 AB", ""],
  ["NL", "0123 AB", "", null, ""],
  ["NL", "1012 SS", "", null, ""],
  // CTT
  ["PT", "1000-001", "", "1000-001", ""],
  ["PT", "1000001", "", null, ""],
  // Australia Post: four digits and a state
  ["AU", "2000", "nsw", "2000", "NSW"],
  ["AU", "200", "NSW", null, "NSW"],
  ["AU", "2000", "", "2000", null],
] as const)("%s postcode %s, region %s", (country, postcode, region, written, writtenRegion) => {
  it(written === null || writtenRegion === null ? "is refused at its field" : "is taken as the post writes it", () => {
    const result = postalAddressSchema.safeParse({ ...base, country, postcode, region });
    if (written !== null && writtenRegion !== null) {
      expect(result.success && result.data).toMatchObject({ postcode: written, region: writtenRegion || null });
    } else {
      expect(result.success).toBe(false);
      const fields = result.error!.issues.map((issue) => issue.path[0]);
      expect(fields).toEqual(written === null ? ["postcode"] : ["region"]);
    }
  });
});

describe("postal address: other countries and optional postcodes", () => {
  it("needs a postcode where the post does, says how it looks, and not in Ireland", () => {
    expect(problems({ ...base, country: "DE" })).toEqual({ postcode: "Enter the postcode, such as 10117." });
    expect(parse({ ...base, country: "IE" }).postcode).toBeNull();
  });

  it("takes any postcode and region elsewhere, the region as typed", () => {
    expect(parse({ ...base, country: "jp", postcode: "100-0001", region: "Tōkyō" })).toMatchObject({
      postcode: "100-0001",
      region: "Tōkyō",
    });
    expect(parse({ ...base, country: "HK" })).toMatchObject({ postcode: null, country: "HK" });
  });
});

describe("country codes", () => {
  it("lists the 249 assigned codes, each one a region the runtime's CLDR names", () => {
    const names = new Intl.DisplayNames(["en"], { type: "region", fallback: "none" });
    expect(new Set(countryCodes).size).toBe(249);
    expect(countryCodes.filter((code) => !names.of(code))).toEqual([]);
  });
});
