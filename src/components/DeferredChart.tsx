import { createContext, use, useEffect, useRef, useState, type ReactNode } from "react";
import { flushSync } from "react-dom";

/** Inside a printable report every chart is drawn in the first render. */
export const DrawChartsAtOnce = createContext(false);

/**
 * Draws a chart after the page's words and numbers have shown: a chart's script and layout take tens
 * of milliseconds each (the Boundary screen's five charts about half a second), which would otherwise
 * hold back the whole screen. Charts draw one at a time, in the order they appeared, each when the
 * browser has a moment free (at the latest after `MAX_WAIT_MS`), at once when scrolled near, and all
 * before printing. The box keeps its size meanwhile (the parent gives the height), so nothing moves
 * when the chart arrives; the words and numbers around the chart are in the page from the start.
 */
export function DeferredChart({ children }: { children: ReactNode }) {
  const atOnce = use(DrawChartsAtOnce);
  const box = useRef<HTMLDivElement>(null);
  const [drawn, setDrawn] = useState(atOnce);

  useEffect(() => {
    if (drawn) return;
    const draw = () => setDrawn(true);
    enqueue(draw);
    // Scrolled to (or near) before its turn: draw now, out of order.
    const observer =
      typeof IntersectionObserver === "undefined"
        ? null
        : new IntersectionObserver(
            (entries) => {
              if (!entries.some((e) => e.isIntersecting)) return;
              cancel(draw);
              draw();
            },
            { rootMargin: "200px 0px" },
          );
    if (box.current) observer?.observe(box.current);
    return () => {
      cancel(draw);
      observer?.disconnect();
    };
  }, [drawn]);

  return (
    <div ref={box} className="h-full w-full" data-chart-drawn={drawn ? "true" : "false"}>
      {drawn ? children : null}
    </div>
  );
}

const MAX_WAIT_MS = 600;
const waiting: Array<() => void> = [];
let scheduled = false;
let listeningForPrint = false;

function enqueue(draw: () => void): void {
  waiting.push(draw);
  if (!listeningForPrint) {
    listeningForPrint = true;
    // A page printed before its turn comes prints with every chart.
    window.addEventListener("beforeprint", () => flushSync(() => waiting.splice(0).forEach((d) => d())));
  }
  schedule();
}

function cancel(draw: () => void): void {
  const at = waiting.indexOf(draw);
  if (at >= 0) waiting.splice(at, 1);
}

/** One chart per free moment, so a click or a scroll never waits behind all of them at once. */
function schedule(): void {
  if (scheduled || waiting.length === 0) return;
  scheduled = true;
  const next = () => {
    scheduled = false;
    waiting.shift()?.();
    schedule();
  };
  if (typeof window.requestIdleCallback === "function") window.requestIdleCallback(next, { timeout: MAX_WAIT_MS });
  else window.setTimeout(next, 0);
}
