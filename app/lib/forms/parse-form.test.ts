import { describe, expect, it } from "vitest";
import { z } from "zod";
import { parseForm } from "./parse-form";

const schema = z.object({ email: z.email("Enter an e-mail address."), password: z.string().min(8, "Too short.") });

function form(values: Record<string, string>) {
  const data = new FormData();
  for (const [name, value] of Object.entries(values)) data.set(name, value);
  return data;
}

describe("parseForm", () => {
  it("returns the parsed data when the input is valid", () => {
    expect(parseForm(schema, form({ email: "a@b.example", password: "long enough" }))).toEqual({
      ok: true,
      data: { email: "a@b.example", password: "long enough" },
    });
  });

  it("gives one message per field and keeps typed values except passwords", () => {
    const result = parseForm(schema, form({ email: "not-an-address", password: "short" }));
    expect(result).toEqual({
      ok: false,
      errors: { email: "Enter an e-mail address.", password: "Too short." },
      values: { email: "not-an-address" },
    });
  });
});
