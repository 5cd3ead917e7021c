/**
 * The fields of a postal address on a Conform form whose schema is `postalAddressSchema` (or extends
 * it): the messages stand at each field, with what was typed.
 */
import type { FieldMetadata } from "@conform-to/react";
import { SelectField, TextField } from "~/components/ui/field";
import { checkedCountries, type addressFields } from "~/lib/shipping/address-schema";
import type { PostalAddress } from "~/lib/shipping/postal-address";

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- a field of any form that holds an address
type AnyField = FieldMetadata<any, any, string[]>;
type AddressFieldSet = Record<(typeof addressFields)[number], AnyField>;

export function AddressFields({ fields, countries }: { fields: AddressFieldSet; countries: { code: string; name: string }[] }) {
  return (
    <div className="grid gap-3 sm:grid-cols-2">
      <TextField label="Name on the parcel" field={fields.name} autoComplete="name" className="sm:col-span-2" />
      <TextField label="Street and number" field={fields.line1} autoComplete="address-line1" className="sm:col-span-2" />
      <TextField label="Flat, building, c/o (optional)" field={fields.line2} autoComplete="address-line2" className="sm:col-span-2" />
      <TextField label="Town or city" field={fields.city} autoComplete="address-level2" />
      <TextField
        label="State, province or county"
        field={fields.region}
        autoComplete="address-level1"
        hint="Needed for the US (e.g. NY), Canada (ON) and Australia (NSW)."
      />
      <TextField label="Postcode" field={fields.postcode} autoComplete="postal-code" hint={`Checked for ${checkedCountries.join(", ")}.`} />
      <SelectField label="Country" field={fields.country} autoComplete="country">
        <option value="">Choose…</option>
        {countries.map((country) => (
          <option key={country.code} value={country.code}>
            {country.name}
          </option>
        ))}
      </SelectField>
      <TextField label="Phone for the carrier (optional)" field={fields.phone} type="tel" autoComplete="tel" className="sm:col-span-2" />
    </div>
  );
}

/** An address as it goes on a parcel, one line each. */
export function AddressLines({ address }: { address: PostalAddress }) {
  const place = [address.postcode, address.city, address.region].filter(Boolean).join(" ");
  return (
    <address className="not-italic">
      {[address.name, address.line1, address.line2, place, address.country, address.phone].filter(Boolean).map((line) => (
        <span key={line} className="block">
          {line}
        </span>
      ))}
    </address>
  );
}
