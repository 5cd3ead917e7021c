/**
 * The frame every Benchpost e-mail shares: the name on an ink band with the amber timing stripe, a paper
 * card for the message, and a footer that says why the recipient got it. Only system fonts: mail
 * clients block or mangle web fonts, and we load nothing from the network.
 */
import { Body, Button, Container, Head, Hr, Html, Link, Preview, Section, Text } from "@react-email/components";
import type { ReactNode } from "react";

export const palette = {
  ink: "#173f4a",
  inkSoft: "#2d707c",
  paper: "#fbfaf6",
  paperDeep: "#f4efe4",
  paperEdge: "#e8dfcc",
  amber: "#e3a52b",
  amberDeep: "#87590a",
} as const;

const fontStack = "-apple-system, 'Segoe UI', Roboto, Helvetica, Arial, sans-serif";

export function EmailLayout({ preview, reason, children }: { preview: string; reason: ReactNode; children: ReactNode }) {
  return (
    <Html lang="en">
      <Head />
      <Preview>{preview}</Preview>
      <Body style={{ backgroundColor: palette.paperDeep, margin: 0, padding: "24px 0", fontFamily: fontStack, color: palette.ink }}>
        <Container style={{ maxWidth: "560px", margin: "0 auto" }}>
          <Section style={{ backgroundColor: palette.ink, borderRadius: "10px 10px 0 0", padding: "16px 28px" }}>
            <Text style={{ margin: 0, color: palette.paper, fontSize: "20px", fontWeight: 600, letterSpacing: "0.02em" }}>Benchpost</Text>
          </Section>
          <Section style={{ backgroundColor: palette.amber, height: "4px", lineHeight: "4px", fontSize: "1px" }}>&nbsp;</Section>
          <Section
            style={{
              backgroundColor: palette.paper,
              border: `1px solid ${palette.paperEdge}`,
              borderTop: "none",
              borderRadius: "0 0 10px 10px",
              padding: "8px 28px 24px",
            }}
          >
            {children}
          </Section>
          <Section style={{ padding: "16px 28px" }}>
            <Text style={{ margin: 0, fontSize: "12px", lineHeight: "18px", color: palette.inkSoft }}>{reason}</Text>
            <Hr style={{ borderColor: palette.paperEdge, margin: "12px 0" }} />
            <Text style={{ margin: 0, fontSize: "12px", color: palette.inkSoft }}>Benchpost · at-home laboratory courses</Text>
          </Section>
        </Container>
      </Body>
    </Html>
  );
}

export function Heading({ children }: { children: ReactNode }) {
  return (
    <Text style={{ fontSize: "22px", lineHeight: "30px", fontWeight: 600, margin: "16px 0 8px", color: palette.ink }}>{children}</Text>
  );
}

export function Paragraph({ children }: { children: ReactNode }) {
  return <Text style={{ fontSize: "15px", lineHeight: "23px", margin: "8px 0", color: palette.ink }}>{children}</Text>;
}

/** The one thing to do, with the address written out below it for clients that hide buttons. */
export function ActionButton({ href, children }: { href: string; children: ReactNode }) {
  return (
    <Section style={{ margin: "20px 0 8px" }}>
      <Button
        href={href}
        style={{
          backgroundColor: palette.ink,
          color: palette.paper,
          borderRadius: "8px",
          padding: "12px 20px",
          fontSize: "15px",
          fontWeight: 600,
          textDecoration: "none",
          borderBottom: `3px solid ${palette.amber}`,
        }}
      >
        {children}
      </Button>
      <Text style={{ fontSize: "12px", lineHeight: "18px", margin: "12px 0 0", color: palette.inkSoft, wordBreak: "break-all" }}>
        Or open this address:{" "}
        <Link href={href} style={{ color: palette.inkSoft }}>
          {href}
        </Link>
      </Text>
    </Section>
  );
}

/** A small two-column list of facts (kit number, carrier, due time…). */
export function FactList({ facts }: { facts: [label: string, value: string][] }) {
  return (
    <Section style={{ backgroundColor: palette.paperDeep, borderRadius: "8px", padding: "8px 16px", margin: "12px 0" }}>
      {facts.map(([label, value]) => (
        <Text key={label} style={{ fontSize: "14px", lineHeight: "20px", margin: "6px 0", color: palette.ink }}>
          <span style={{ color: palette.amberDeep, fontWeight: 600 }}>{label}:</span> {value}
        </Text>
      ))}
    </Section>
  );
}
