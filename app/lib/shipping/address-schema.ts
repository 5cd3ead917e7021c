/**
 * A postal address checked the way the destination's post reads it: the fields every label needs, and
 * for the countries below the postcode's pattern (and the state or province where the post asks for
 * one). Any other country's postcode and region are free text. What comes out is trimmed, with the
 * country and postcode in capitals and the postcode written the way its post writes it.
 *
 * The same schema checks the student's form (in the browser and on the server) and every row of an
 * instructor's CSV import, so the preview never promises what the server then refuses.
 */
import { z } from "zod";
import type { PostalAddress } from "./postal-address";

/**
 * ISO 3166-1 alpha-2, the officially assigned codes (249). From memory of the ISO 3166 Maintenance
 * Agency's list; the unit test checks each against the runtime's CLDR region names.
 */
export const countryCodes: readonly string[] = (
  "AD AE AF AG AI AL AM AO AQ AR AS AT AU AW AX AZ BA BB BD BE BF BG BH BI BJ BL BM BN BO BQ BR BS BT BV BW BY BZ " +
  "CA CC CD CF CG CH CI CK CL CM CN CO CR CU CV CW CX CY CZ DE DJ DK DM DO DZ EC EE EG EH ER ES ET FI FJ FK FM FO FR " +
  "GA GB GD GE GF GG GH GI GL GM GN GP GQ GR GS GT GU GW GY HK HM HN HR HT HU ID IE IL IM IN IO IQ IR IS IT JE JM JO JP " +
  "KE KG KH KI KM KN KP KR KW KY KZ LA LB LC LI LK LR LS LT LU LV LY MA MC MD ME MF MG MH MK ML MM MN MO MP MQ MR MS MT " +
  "MU MV MW MX MY MZ NA NC NE NF NG NI NL NO NP NR NU NZ OM PA PE PF PG PH PK PL PM PN PR PS PT PW PY QA RE RO RS RU RW " +
  "SA SB SC SD SE SG SH SI SJ SK SL SM SN SO SR SS ST SV SX SY SZ TC TD TF TG TH TJ TK TL TM TN TO TR TT TV TW TZ UA UG " +
  "UM US UY UZ VA VC VE VG VI VN VU WF WS YE YT ZA ZM ZW"
).split(" ");
const knownCountries = new Set(countryCodes);

type CountryRule = {
  /** Checked on the postcode in capitals, with its spaces as typed. */
  postcode: RegExp;
  /** Said in the message when a postcode does not fit. */
  example: string;
  /** Ireland's Eircode is not needed for delivery; everywhere else below the postcode is. */
  postcodeOptional?: true;
  /** How the post writes a postcode that fits (the space where it goes). */
  write?: (postcode: string) => string;
  /** The region codes the post uses, where an address must name one. */
  regions?: { word: string; codes: readonly string[]; example: string };
};

/** A space before the last three characters: the inward code (GB), the unique identifier's split (CA). */
const spaceBeforeLast = (count: number) => (postcode: string) => {
  const joined = postcode.replace(/\s+/g, "");
  return `${joined.slice(0, -count)} ${joined.slice(-count)}`;
};

const rules: Record<string, CountryRule> = {
  // USPS Publication 28 (Postal Addressing Standards), §2 ZIP Code and ZIP+4, and Appendix B, the
  // two-letter state and territory abbreviations (armed forces AA/AE/AP included). From memory.
  US: {
    postcode: /^\d{5}(-\d{4})?$/,
    example: "12345 or 12345-6789",
    regions: {
      word: "state",
      example: "NY",
      codes: (
        "AL AK AZ AR CA CO CT DE DC FL GA HI ID IL IN IA KS KY LA ME MD MA MI MN MS MO MT NE NV NH NJ NM NY NC ND OH OK OR PA " +
        "RI SC SD TN TX UT VT VA WA WV WI WY AS GU MP PR VI UM AA AE AP"
      ).split(" "),
    },
  },
  // Canada Post, Canadian Addressing Guide: A1A 1A1, never D F I O Q U, and no W or Z as the first
  // letter; the 13 two-letter province and territory symbols. From memory.
  CA: {
    postcode: /^[ABCEGHJ-NPRSTVXY]\d[ABCEGHJ-NPRSTV-Z] ?\d[ABCEGHJ-NPRSTV-Z]\d$/,
    example: "K1A 0B1",
    write: spaceBeforeLast(3),
    regions: { word: "province or territory", example: "ON", codes: "AB BC MB NB NL NS NT NU ON PE QC SK YT".split(" ") },
  },
  // Royal Mail's postcode format (outward code of 2–4 characters, inward code of a digit and two
  // letters, never C I K M O V in the inward letters), as in the UK government's bulk data
  // standard's pattern; GIR 0AA is Girobank's. From memory. Royal Mail needs no county.
  GB: {
    postcode: /^(GIR ?0AA|[A-PR-UWYZ](\d{1,2}|[A-HK-Y]\d(\d|[ABEHMNPRV-Y])?|\d[A-HJKPS-UW]) ?\d[ABD-HJLNP-UW-Z]{2})$/,
    example: "SW1A 1AA",
    write: spaceBeforeLast(3),
  },
  // Eircode (eircode.ie): a routing key of a letter and two digits (or D6W), then four characters of
  // 0–9 and A C D E F H K N P R T V W X Y. An Post delivers without one. From memory.
  IE: {
    postcode: /^([AC-FHKNPRTV-Y]\d{2}|D6W) ?[0-9AC-FHKNPRTV-Y]{4}$/,
    example: "D02 X285",
    postcodeOptional: true,
    write: spaceBeforeLast(4),
  },
  // Deutsche Post: Postleitzahl of five digits. From memory.
  DE: { postcode: /^\d{5}$/, example: "10117" },
  // La Poste: code postal of five digits. From memory.
  FR: { postcode: /^\d{5}$/, example: "75008" },
  // PostNL: four digits not starting with 0, then two letters, never SA, SD or SS. From memory.
  NL: { postcode: /^[1-9]\d{3} ?(?!SA|SD|SS)[A-Z]{2}$/, example: "1012 AB", write: spaceBeforeLast(2) },
  // CTT Correios de Portugal: código postal of four digits, a hyphen and three digits. From memory.
  PT: { postcode: /^\d{4}-\d{3}$/, example: "1000-001" },
  // Australia Post: postcode of four digits, with the state or territory's abbreviation. From memory.
  AU: {
    postcode: /^\d{4}$/,
    example: "2000",
    regions: { word: "state or territory", example: "NSW", codes: "ACT NSW NT QLD SA TAS VIC WA".split(" ") },
  },
};

/** The countries whose postcodes are checked, for a form's hint. */
export const checkedCountries = Object.keys(rules);

// eslint-disable-next-line no-control-regex -- NUL and lone surrogates are what PostgreSQL cannot keep
const unstorable = /\u0000|[\uD800-\uDFFF]/u;
const storable = (value: string) => !unstorable.test(value);
const brokenText = "Remove the control character or broken symbol from this text.";

const required = (max: number, missing: string) =>
  z.string({ error: missing }).trim().min(1, missing).max(max, `Keep this under ${max} characters.`).refine(storable, brokenText);

/** Blank or left out is null. */
const optional = (max: number) =>
  z
    .string()
    .optional()
    .transform((value) => value ?? "")
    .pipe(z.string().trim().max(max, `Keep this under ${max} characters.`).refine(storable, brokenText))
    .transform((value) => value || null);

const fieldsSchema = z.object({
  name: required(120, "Enter the name to put on the parcel."),
  line1: required(200, "Enter the street and number."),
  line2: optional(200),
  city: required(120, "Enter the town or city."),
  region: optional(80),
  postcode: optional(20).transform((value) => value?.toUpperCase() ?? null),
  country: required(60, "Choose the country.")
    .transform((value) => value.toUpperCase())
    .refine((code) => knownCountries.has(code), "Give the country as its two-letter code (ISO 3166-1), such as DE or US."),
  phone: optional(40).refine(
    (value) => value === null || /^\+?[0-9 ()./-]{5,40}$/.test(value),
    "Write the phone number with digits, spaces and + ( ) - only.",
  ),
});

const ruleOf = (country: string): CountryRule | undefined => rules[country];

/** Any field of these failing already means the country's rule cannot be read. */
const ruleFields = new Set(["country", "postcode", "region"]);

export const postalAddressSchema = fieldsSchema
  .superRefine(
    (address, context) => {
      const rule = ruleOf(address.country);
      if (!rule) return;
      if (!address.postcode) {
        if (!rule.postcodeOptional)
          context.addIssue({ code: "custom", path: ["postcode"], message: `Enter the postcode, such as ${rule.example}.` });
      } else if (!rule.postcode.test(address.postcode)) {
        context.addIssue({
          code: "custom",
          path: ["postcode"],
          message: `“${address.postcode}” is not a postcode there; write it like ${rule.example}.`,
        });
      }
      if (rule.regions && !rule.regions.codes.includes(address.region?.toUpperCase() ?? "")) {
        context.addIssue({
          code: "custom",
          path: ["region"],
          message: address.region
            ? `“${address.region}” is not a ${rule.regions.word} code; write it like ${rule.regions.example}.`
            : `Enter the ${rule.regions.word} as its code, such as ${rule.regions.example}.`,
        });
      }
    },
    // Runs while other fields (the name, the street) have problems too, so that every message shows at once.
    // (An issue without a path is the whole input refused: nothing to read a rule from.)
    { when: (payload) => payload.issues.every((issue) => issue.path?.length && !ruleFields.has(String(issue.path[0]))) },
  )
  .transform((address): PostalAddress => {
    const rule = ruleOf(address.country);
    return {
      ...address,
      // A region is a code in capitals only where the post uses codes; elsewhere it stays as typed.
      region: rule?.regions ? (address.region?.toUpperCase() ?? null) : address.region,
      postcode: address.postcode && rule?.write ? rule.write(address.postcode) : address.postcode,
    };
  });

export type PostalAddressInput = z.input<typeof postalAddressSchema>;

/** Every address field, in the order a form and the CSV template list them. */
export const addressFields = [
  "name",
  "line1",
  "line2",
  "city",
  "region",
  "postcode",
  "country",
  "phone",
] as const satisfies readonly (keyof PostalAddress)[];

/** Every country with its English name, by name, for a form's list. Read in a loader, so server and browser show the same names. */
export function countryOptions(): { code: string; name: string }[] {
  const names = new Intl.DisplayNames(["en"], { type: "region", fallback: "code" });
  return countryCodes.map((code) => ({ code, name: names.of(code) ?? code })).sort((a, b) => a.name.localeCompare(b.name, "en"));
}
