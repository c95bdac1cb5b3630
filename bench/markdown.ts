// Parse time of thread posts built to be hard for the markdown reader (tests/support/adversarialPosts.ts),
// at the maximum post length: the bound is about 50 ms per 10,000 characters for any
// request, and a thread list reads 20 posts. `npx tsx bench/markdown.ts` prints a table;
// bench/run.ts imports benchMarkdown().
import { pathToFileURL } from "node:url";
import { MARKDOWN_MAX_LENGTH, parseMarkdown } from "../shared/markdown";
import { ADVERSARIAL_POSTS } from "../tests/support/adversarialPosts";
import { quantile } from "./quantile";
import type { BenchFigure } from "./suites";

const RUNS = 15;

export async function benchMarkdown(): Promise<BenchFigure[]> {
  const figures: BenchFigure[] = [];
  const names = ["Ada", "Ada Stone"];
  for (const post of ADVERSARIAL_POSTS) {
    const source = post.make(MARKDOWN_MAX_LENGTH);
    parseMarkdown(source, { mentionNames: names }); // warm-up
    const times: number[] = [];
    const work = { steps: 0 };
    for (let r = 0; r < RUNS; r++) {
      const start = performance.now();
      parseMarkdown(source, { mentionNames: names, work: r === 0 ? work : undefined });
      times.push(performance.now() - start);
    }
    times.sort((a, b) => a - b);
    figures.push({ name: `markdown 10k: ${post.name}`, value: quantile(times, 0.5), unit: "ms", note: `median of ${RUNS}; ${(work.steps / source.length).toFixed(1)} steps per character; target < 50 ms` });
  }
  return figures;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  for (const f of await benchMarkdown()) console.log(`${f.name.padEnd(70)} ${f.value.toFixed(2).padStart(8)} ${f.unit}  ${f.note ?? ""}`);
}
