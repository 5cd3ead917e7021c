import { describe, expect, it } from "vitest";
import { AppError } from "~/lib/app-error";
import { errorReply, formAction, toResponse } from "./errors.server";

const form = (entries: Record<string, string>) => {
  const data = new FormData();
  for (const [name, value] of Object.entries(entries)) data.set(name, value);
  return data;
};

describe("errorReply", () => {
  it("puts the message at its field and keeps what was typed, but never a password", () => {
    const reply = errorReply(
      new AppError({ code: "course_exists", message: "Taken.", field: "code" }),
      form({ code: "ME 1", password: "hunter22" }),
    );
    expect(reply.error).toEqual({ code: ["Taken."] });
    expect(reply.initialValue).toEqual({ code: "ME 1" });
  });

  it("puts each issue at the field Conform names for its path", () => {
    const error = new AppError({
      code: "not_reducible",
      message: "These values cannot be reduced.",
      issues: [
        { path: ["drops", 3], message: "Too fast." },
        { path: ["rows", 0, "label"], message: "Give a label." },
      ],
    });
    expect(errorReply(error).error).toEqual({
      "drops[3]": ["Too fast."],
      "rows[0].label": ["Give a label."],
      "": ["These values cannot be reduced."],
    });
  });

  it("puts a message without a field above the form", () => {
    expect(errorReply(new AppError({ code: "lab_closed", message: "Closed." })).error).toEqual({ "": ["Closed."] });
  });
});

describe("toResponse", () => {
  const refusal = new AppError({ code: "rate_limited", status: 429, message: "Wait.", retryAfterSeconds: 60 });

  it("answers the API's JSON shape under /api/, with Retry-After", async () => {
    const response = toResponse(new Request("http://localhost/api/v1/reduce", { method: "POST" }), refusal) as Response;
    expect(response.status).toBe(429);
    expect(response.headers.get("Retry-After")).toBe("60");
    expect(await response.json()).toEqual({ error: { code: "rate_limited", message: "Wait." } });
  });

  it("answers a page with the form's reply and the refusal's status", () => {
    const response = toResponse(new Request("http://localhost/courses/new", { method: "POST" }), refusal);
    expect(response).not.toBeInstanceOf(Response);
    expect(response).toMatchObject({ init: { status: 429 }, data: { status: "error", error: { "": ["Wait."] } } });
  });
});

describe("formAction", () => {
  const request = () => new Request("http://localhost/courses/new", { method: "POST", body: form({ title: "Fluids" }) });

  it("turns a refusal into the reply", async () => {
    const action = formAction(async () => {
      throw new AppError({ code: "course_exists", message: "Taken.", field: "title" });
    });
    expect(await action({ request: request(), params: {}, context: {} } as never)).toMatchObject({
      data: { error: { title: ["Taken."] }, initialValue: { title: "Fluids" } },
    });
  });

  it("lets any other error through, to become a 500", async () => {
    const action = formAction(async () => {
      throw new Error("disk full");
    });
    await expect(action({ request: request(), params: {}, context: {} } as never)).rejects.toThrow("disk full");
  });
});
