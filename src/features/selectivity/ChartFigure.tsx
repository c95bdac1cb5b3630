import { useId, useRef, useState, type ReactNode } from "react";
import { Button } from "../../components/Button";
import { cx } from "../../lib/cx";
import { useToast } from "../../components/Toast";
import { downloadPng, downloadSvg } from "./chartDownload";

export interface ChartFigureProps {
  /** What the chart shows, in a sentence: the caption under it. */
  caption: ReactNode;
  /** File name without extension for the downloads. */
  fileName: string;
  chart: ReactNode;
  /** The numbers behind the chart, as a table; leave out when a table beside the chart holds them. */
  numbers?: ReactNode;
  /** Open the numbers at once (the report prints them). */
  numbersOpen?: boolean;
  className?: string;
}

/**
 * A chart with its caption, its numbers in a table nearby (the text alternative), and buttons that
 * save the drawing as SVG or PNG.
 */
export function ChartFigure({ caption, fileName, chart, numbers, numbersOpen = false, className }: ChartFigureProps) {
  const captionId = useId();
  const holder = useRef<HTMLDivElement>(null);
  const toast = useToast();
  const [saving, setSaving] = useState(false);

  const svg = () => holder.current?.querySelector("svg") ?? null;
  const saveSvg = () => {
    const element = svg();
    if (element) downloadSvg(element, fileName);
  };
  const savePng = async () => {
    const element = svg();
    if (!element) return;
    setSaving(true);
    try {
      await downloadPng(element, fileName);
    } catch (err) {
      toast.show(err instanceof Error ? err.message : "The PNG could not be made.", "error");
    } finally {
      setSaving(false);
    }
  };

  return (
    <figure aria-labelledby={captionId} className={cx("break-inside-avoid", className)}>
      <div ref={holder}>{chart}</div>
      <figcaption id={captionId} className="mt-2 text-sm text-stone-600">
        {caption}
      </figcaption>
      <div className="mt-3 flex flex-wrap items-center gap-2 print:hidden">
        <Button variant="secondary" size="sm" onClick={saveSvg}>
          Download SVG
        </Button>
        <Button variant="secondary" size="sm" onClick={() => void savePng()} busy={saving}>
          Download PNG
        </Button>
      </div>
      {numbers && (
        <details className="mt-3" open={numbersOpen || undefined}>
          <summary className="cursor-pointer text-sm font-medium text-accent-700 hover:text-accent-900 print:hidden">Numbers behind the chart</summary>
          <div className="mt-2">{numbers}</div>
        </details>
      )}
    </figure>
  );
}
