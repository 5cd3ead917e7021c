import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { Form } from "react-router";
import { accountInput } from "~/components/account/account-input";
import { AccountSection, formatUtc } from "~/components/account/section";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { parseSubmission } from "~/lib/forms/submission";

type ApiToken = { id: string; name: string; createdAt: Date | string; lastUsedAt: Date | string | null };

/** Personal API tokens: a new one is shown once, right after it is made; the list only names them. */
export function ApiTokens({
  tokens,
  created,
  lastResult,
  busy,
}: {
  tokens: ApiToken[];
  created?: { name: string; token: string };
  lastResult?: SubmissionResult;
  busy: boolean;
}) {
  const [form, fields] = useForm({
    id: "create-token",
    lastResult,
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: ({ formData }) => parseSubmission(formData, accountInput),
  });
  return (
    <AccountSection id="tokens-title" title="Personal API tokens">
      <p className="text-sm text-ink-700">
        For scripts that call Benchpost's API as you: send the token as <code>Authorization: Bearer …</code>. Treat it like a password.
      </p>
      {created ? (
        <div className="mt-3">
          <Notice tone="success">
            <p>Token “{created.name}” created. Copy it now: it is shown only this once.</p>
            <p
              className="mt-2 break-all rounded bg-white px-2 py-1 font-mono text-ink-950 ring-1 ring-ink-900/10"
              data-testid="new-api-token"
            >
              {created.token}
            </p>
          </Notice>
        </div>
      ) : null}
      <Form method="post" className="mt-3 flex flex-col gap-3 sm:flex-row sm:items-end" {...getFormProps(form)}>
        <input type="hidden" name="intent" value="create-token" />
        <TextField className="flex-1" label="Token name" field={fields.tokenName} placeholder="e.g. mark export script" required />
        <Button type="submit" disabled={busy}>
          Create a token
        </Button>
      </Form>
      {tokens.length > 0 ? (
        <table className="mt-4 w-full text-left text-sm">
          <thead>
            <tr className="text-ink-600">
              <th className="py-2 font-medium">Name</th>
              <th className="py-2 font-medium">Created</th>
              <th className="py-2 font-medium">Last used</th>
              <th className="py-2">
                <span className="sr-only">Revoke</span>
              </th>
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-900/10">
            {tokens.map((token) => (
              <tr key={token.id}>
                <td className="py-2">{token.name}</td>
                <td className="py-2">{formatUtc(token.createdAt)}</td>
                <td className="py-2">{token.lastUsedAt ? formatUtc(token.lastUsedAt) : "never"}</td>
                <td className="py-2 text-right">
                  <Form method="post">
                    <input type="hidden" name="intent" value="revoke-token" />
                    <input type="hidden" name="tokenId" value={token.id} />
                    <Button type="submit" variant="danger" disabled={busy} aria-label={`Revoke ${token.name}`}>
                      Revoke
                    </Button>
                  </Form>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      ) : null}
    </AccountSection>
  );
}
