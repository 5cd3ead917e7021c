import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { DragCurveChart, FigureStripChart, ViscometryChart, type ComparisonPoint } from "./comparison-charts";
import { DropTimesChart } from "./drop-times-chart";

const point = (index: number, overrides: Partial<ComparisonPoint> = {}): ComparisonPoint => ({
  id: `p${index}`,
  href: `/courses/c/labs/l/comparison#drop-log-p${index}`,
  studentName: `Student ${index}`,
  label: index % 7 === 0 ? "outlier" : index % 5 === 0 ? "suspect" : "consistent",
  figure: 1 + (index % 10) / 100,
  reynolds: 0.5 + index / 10,
  dragCoefficient: 40 / (0.5 + index / 10),
  viscosityPaS: 1 + index / 100,
  referenceViscosityPaS: 1,
  temperatureC: 20 + (index % 5),
  ...overrides,
});

const count = (markup: string, pattern: RegExp) => (markup.match(pattern) ?? []).length;

/** y of an SVG path (M/L segments) at pixel x, by linear interpolation between its vertices. */
function pathYAt(d: string, x: number): number {
  const vertices = [...d.matchAll(/[ML](-?[\d.]+),(-?[\d.]+)/g)].map((match) => [Number(match[1]), Number(match[2])]);
  for (let i = 1; i < vertices.length; i++) {
    const [x0, y0] = vertices[i - 1];
    const [x1, y1] = vertices[i];
    if (x >= x0 && x <= x1) return y0 + ((x - x0) / (x1 - x0)) * (y1 - y0);
  }
  throw new Error(`x = ${x} is off the path`);
}

describe("comparison plots", () => {
  it("draws one linked point per hand-in, with shape per label, a legend, a title, a description and a table", () => {
    const points = Array.from({ length: 23 }, (_, i) => point(i));
    const markup = renderToStaticMarkup(<DragCurveChart points={points} title="Drag" />);
    expect(count(markup, /data-point="/g)).toBe(23);
    expect(count(markup, /href="\/courses\/c\/labs\/l\/comparison#drop-log-p\d+"/g)).toBe(23 * 2); // point and table row
    // 3 legend markers plus one per point, by label: circles (consistent), paths (suspect), rects (outlier).
    const outliers = points.filter((p) => p.label === "outlier").length;
    expect(count(markup, /<rect[^>]*data-label="outlier"/g)).toBe(outliers + 1);
    expect(markup).toContain("<title");
    expect(markup).toContain("<desc");
    expect(markup).toContain("<figcaption");
    expect(markup).toContain("<details");
    expect(count(markup, /data-curve="/g)).toBe(3);
  });

  // Standard drag curve values (Clift, Grace & Weber 1978, Table 5.2, as in app/lib/reduction/drag.test.ts):
  // Re = 1: 27.156, Re = 10: 4.2584, Re = 100: 1.087; Schiller–Naumann lies within 5 % of them.
  it.each([
    [1, 27.156],
    [10, 4.2584],
    [100, 1.087],
  ])("draws the Schiller–Naumann curve through the standard drag curve at Re = %f (C_D %f, within 5 %%)", (reynolds, standard) => {
    // Two probe points 5 % above and below the published value: the drawn curve must pass between them.
    const probes = [
      point(1, { id: "high", reynolds, dragCoefficient: standard * 1.05 }),
      point(2, { id: "low", reynolds, dragCoefficient: standard / 1.05 }),
    ];
    const span = [point(3, { id: "a", reynolds: 0.5, dragCoefficient: 50 }), point(4, { id: "b", reynolds: 200, dragCoefficient: 0.7 })];
    const markup = renderToStaticMarkup(<DragCurveChart points={[...probes, ...span]} title="Drag" />);
    const d = markup.match(/data-curve="schiller-naumann" d="([^"]+)"/)![1];
    const marker = (id: string) => {
      const match = markup.match(new RegExp(`data-point="${id}"[^>]*><circle cx="([\\d.]+)" cy="([\\d.]+)"`))!;
      return { x: Number(match[1]), y: Number(match[2]) };
    };
    const high = marker("high");
    const low = marker("low");
    const curveY = pathYAt(d, high.x);
    expect(curveY).toBeGreaterThan(high.y);
    expect(curveY).toBeLessThan(low.y);
  });

  it("draws the viscometry plot with y = x and the strip with the Tukey fences", () => {
    const points = Array.from({ length: 12 }, (_, i) => point(i));
    const viscometry = renderToStaticMarkup(<ViscometryChart points={points} title="Viscometry" />);
    expect(count(viscometry, /data-point="/g)).toBe(12);
    expect(viscometry).toContain('data-curve="identity"');
    const strip = renderToStaticMarkup(
      <FigureStripChart
        points={points}
        limits={{ kind: "tukey", inner: [0.9, 1.1], outer: [0.8, 1.2], note: "Tukey's fences at k = 1.5 and 3" }}
        title="Strip"
      />,
    );
    expect(count(strip, /data-point="/g)).toBe(12);
    expect(count(strip, /data-limit="inner fence"/g)).toBe(2);
    expect(count(strip, /data-limit="outer fence"/g)).toBe(2);
  });

  it("labels log-axis ticks in plain decimals (10, not 1e+1)", () => {
    const span = [point(1, { id: "a", reynolds: 0.05, dragCoefficient: 500 }), point(2, { id: "b", reynolds: 40, dragCoefficient: 2 })];
    const markup = renderToStaticMarkup(<DragCurveChart points={span} title="Drag" />);
    const tickLabels = [...markup.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((match) => match[1]);
    expect(tickLabels).toContain("10");
    expect(tickLabels).toContain("0.1");
    expect(tickLabels.filter((label) => /\de[+-]/.test(label))).toEqual([]);
  });

  it("marks a drop log's stray drops", () => {
    const markup = renderToStaticMarkup(<DropTimesChart drops={[7.4, 7.5, 7.45, 9.9, 7.38]} strayDrops={[3]} title="Drops" />);
    expect(count(markup, /data-drop="/g)).toBe(5);
    expect(count(markup, /<rect[^>]*data-label="outlier"/g)).toBe(1);
  });
});
