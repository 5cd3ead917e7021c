/** Subject lines and HTML + plain-text renderings of the templates in `emails/`. */
import { render, toPlainText } from "@react-email/render";
import { createElement } from "react";
import { emailTemplates } from "../../../emails";
import { type EmailTemplateName, type EmailTemplates, emailTemplateNames, templatePropsSchemas } from "../../../emails/template-props";

export type RenderedEmail = { subject: string; html: string; text: string };

export function emailSubject<T extends EmailTemplateName>(template: T, props: EmailTemplates[T]): string {
  return (emailTemplates[template] as (typeof emailTemplates)[T]).subject(props);
}

export async function renderEmail<T extends EmailTemplateName>(template: T, props: EmailTemplates[T]): Promise<RenderedEmail> {
  const { Component } = emailTemplates[template] as (typeof emailTemplates)[T];
  const html = await render(createElement(Component as React.ComponentType<EmailTemplates[T]>, props));
  return { subject: emailSubject(template, props), html, text: toPlainText(html) };
}

/** For the worker: the outbox keeps props as JSON, so the template's schema revives them (dates). */
export async function renderStoredEmail(template: string, storedProps: unknown): Promise<RenderedEmail> {
  if (!(template in templatePropsSchemas)) throw new Error(`Unknown e-mail template "${template}".`);
  const name = template as EmailTemplateName;
  const props = templatePropsSchemas[name].parse(storedProps) as EmailTemplates[typeof name];
  return renderEmail(name, props);
}

/** Every template rendered with its invented preview props, for the development inbox. */
export function renderTemplatePreviews(): Promise<({ template: EmailTemplateName } & RenderedEmail)[]> {
  return Promise.all(
    emailTemplateNames.map(async (template) => ({ template, ...(await renderEmail(template, emailTemplates[template].previewProps)) })),
  );
}
