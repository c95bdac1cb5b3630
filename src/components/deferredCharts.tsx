// The @nivo charts of the app, drawn after the words and numbers around them (see DeferredChart).
import { ResponsiveBar, type BarDatum, type ResponsiveBarSvgProps } from "@nivo/bar";
import { ResponsiveLine, type LineSeries } from "@nivo/line";
import type { ComponentProps } from "react";
import { DeferredChart } from "./DeferredChart";

export function DeferredBar<D extends BarDatum>(props: ResponsiveBarSvgProps<D>) {
  return (
    <DeferredChart>
      <ResponsiveBar<D> {...props} />
    </DeferredChart>
  );
}

export function DeferredLine<S extends LineSeries>(props: ComponentProps<typeof ResponsiveLine<S>>) {
  return (
    <DeferredChart>
      <ResponsiveLine<S> {...props} />
    </DeferredChart>
  );
}
