"use client";

import { forwardRef } from "react";
import { CartesianGrid, ErrorBar, ReferenceLine, ResponsiveContainer, Scatter, ScatterChart, XAxis, YAxis } from "recharts";
import { decadeTicks, uncodedCurve, type ChannelSpec } from "@/lib/console-client/sim-plot";
import type { SimulationItem } from "@/lib/console-client/types";
import { pointName } from "../words";

type Rate = NonNullable<SimulationItem["points"][number]["ber"]>;
interface Mark {
  x: number;
  y: number;
  /** Distances from the estimate down and up to the Clopper–Pearson bounds, clipped to the axis (a lower bound of 0 has no place on a log axis). */
  err: [number, number];
}

/** What the plot draws, in words: the legend under it and the exported files name the same. */
export const SERIES_WORDS = {
  ber: "BER: circles joined by a solid line",
  fer: "FER: squares joined by a dashed line",
  uncoded: "uncoded BER of the same channel: dotted line, no markers",
  bars: "bars: two-sided Clopper–Pearson interval",
};

export interface PlotModel {
  ber: Mark[];
  fer: Mark[];
  uncoded: { x: number; y: number }[];
  xLog: boolean;
  xDomain: [number, number];
  yDomain: [number, number];
  yTicks: number[];
  limitDb: number | null;
  xLabel: string;
}

const marks = (points: SimulationItem["points"], pick: (p: SimulationItem["points"][number]) => Rate | null, floor: number): Mark[] =>
  points.flatMap((p) => {
    const r = pick(p);
    if (!r || r.estimate <= 0) return [];
    return [{ x: p.x, y: r.estimate, err: [r.estimate - Math.max(r.clopperPearson.lower, floor), r.clopperPearson.upper - r.estimate] as [number, number] }];
  });

/** The axes and series of a simulation's plot: log error-rate axis; log p on the BSC and BEC, linear dB on AWGN. */
export function plotModel(sim: Pick<SimulationItem, "points" | "request">, limitDb: number | null): PlotModel {
  const channel = (sim.request as { channel: ChannelSpec }).channel;
  const xs = sim.points.map((p) => p.x);
  const xLog = channel.type !== "awgn" && xs.every((x) => x > 0);
  let lo = Math.min(...xs);
  let hi = Math.max(...xs);
  if (xLog) [lo, hi] = [lo / 2, Math.min(1, hi * 2)];
  else {
    if (limitDb !== null) lo = Math.min(lo, limitDb);
    [lo, hi] = [Math.floor(lo - 0.5), Math.ceil(hi + 0.5)];
  }
  const curve = uncodedCurve(channel, lo, hi);
  const seen = sim.points.flatMap((p) => [p.ber, p.fer]).filter((r): r is Rate => r !== null && r.estimate > 0);
  const yValues = [...seen.flatMap((r) => [r.estimate, r.clopperPearson.upper]), ...seen.map((r) => r.clopperPearson.lower).filter((v) => v > 0)];
  // The uncoded curve may fall far below the measured rates: the axis follows the data, down to a decade under its lowest.
  const yMinData = yValues.length ? Math.min(...yValues) : 1e-6;
  const yTicks = decadeTicks(Math.max(yMinData / 10, 1e-15), Math.min(1, Math.max(...yValues, 1e-1)));
  const yDomain: [number, number] = [yTicks[0]!, Math.min(1, yTicks.at(-1)!)];
  return {
    ber: marks(sim.points, (p) => p.ber, yDomain[0]),
    fer: marks(sim.points, (p) => p.fer, yDomain[0]),
    uncoded: curve.filter((q) => q.ber >= yDomain[0]).map((q) => ({ x: q.x, y: q.ber })),
    xLog,
    xDomain: [lo, hi],
    yDomain,
    yTicks: yTicks.filter((t) => t <= 1),
    limitDb,
    xLabel: pointName(channel),
  };
}

const exp = (v: number) => {
  const e = Math.round(Math.log10(v));
  return e === 0 ? "1" : `1e${e}`;
};
/** Whole decibels across the (whole-number) domain; every other one on a wide sweep. */
const dbTicks = ([lo, hi]: [number, number]) => {
  const step = hi - lo > 12 ? 2 : 1;
  return Array.from({ length: Math.floor((hi - lo) / step) + 1 }, (_, i) => lo + i * step);
};
const tick = { fill: "var(--pa-ink-2)", fontSize: 12 };
const ink = "var(--pa-ink)";

/** The error-rate plot. The parent gives the text alternative (the counts table) and names the plot with aria-labelledby. */
export const ErrorRatePlot = forwardRef<HTMLDivElement, { model: PlotModel; rateWords: string; labelledBy: string }>(function ErrorRatePlot({ model, rateWords, labelledBy }, ref) {
  return (
    <div ref={ref} role="img" aria-labelledby={labelledBy} className="h-80 w-full sm:h-96">
      <ResponsiveContainer width="100%" height="100%">
        <ScatterChart margin={{ top: 12, right: 16, bottom: 28, left: 8 }} accessibilityLayer={false}>
          <CartesianGrid stroke="var(--pa-rule)" strokeDasharray="3 4" />
          <XAxis
            type="number"
            dataKey="x"
            scale={model.xLog ? "log" : "linear"}
            domain={model.xDomain}
            allowDataOverflow
            ticks={model.xLog ? decadeTicks(model.xDomain[0], model.xDomain[1]).filter((t) => t >= model.xDomain[0] && t <= model.xDomain[1]) : dbTicks(model.xDomain)}
            tickFormatter={(v: number) => (model.xLog ? exp(v) : String(Math.round(v * 10) / 10))}
            tick={tick}
            label={{ value: model.xLabel, position: "insideBottom", offset: -16, style: { fill: "var(--pa-ink-2)", fontSize: 12 } }}
          />
          <YAxis
            type="number"
            dataKey="y"
            scale="log"
            domain={model.yDomain}
            allowDataOverflow
            ticks={model.yTicks}
            tickFormatter={exp}
            width={52}
            tick={tick}
            label={{ value: "error rate", angle: -90, position: "insideLeft", style: { textAnchor: "middle", fill: "var(--pa-ink-2)", fontSize: 12 } }}
          />
          {model.limitDb !== null ? (
            <ReferenceLine
              x={model.limitDb}
              stroke={ink}
              strokeDasharray="8 3 2 3"
              label={{ value: `Shannon limit ${rateWords}`, position: "insideTopLeft", fill: "var(--pa-ink-2)", fontSize: 11 }}
            />
          ) : null}
          <Scatter name="uncoded BER" data={model.uncoded} line={{ stroke: "var(--pa-ink-2)", strokeDasharray: "2 3", strokeWidth: 1.5 }} shape={() => <g />} isAnimationActive={false} />
          <Scatter name="FER" data={model.fer} fill="var(--pa-brass)" line={{ stroke: "var(--pa-brass)", strokeDasharray: "6 4", strokeWidth: 1.5 }} shape="square" isAnimationActive={false}>
            <ErrorBar dataKey="err" direction="y" width={6} stroke="var(--pa-brass)" />
          </Scatter>
          <Scatter name="BER" data={model.ber} fill="var(--pa-accent)" line={{ stroke: "var(--pa-accent)", strokeWidth: 1.5 }} shape="circle" isAnimationActive={false}>
            <ErrorBar dataKey="err" direction="y" width={6} stroke="var(--pa-accent)" />
          </Scatter>
        </ScatterChart>
      </ResponsiveContainer>
    </div>
  );
});
