// An invented crisis across 66 Ma, set up for tests: invented genera by life habit, the first
// `victims` of each habit last seen at 67 Ma (inside the Maastrichtian, so they die out at 66 Ma),
// the rest ranging on to 60 Ma; and, for browser tests, a study lead, a study and a finished run of
// the life habit. Every name is invented.
import type { BrowserContext } from "playwright-core";
import { expect } from "vitest";
import { taxa } from "../../db/schema/index";
import type { TestApp } from "./server";
import { leadWithStudy } from "./leadWithStudy";

export interface InventedCrisis {
  habits: ReadonlyArray<{ code: string; victims: number }>;
  /** Genera per habit. */
  perHabit: number;
  /** The invented genus each taxon's name starts with. */
  genus: string;
  /** The higher taxon of the k-th genus of a habit. */
  higherTaxon: (k: number) => string;
}

/** The crisis's taxa as rows for the taxa table of `studyId`, life habit under `habitId`. */
export function crisisTaxaRows(crisis: InventedCrisis, studyId: string, habitId: string) {
  return crisis.habits.flatMap((h) =>
    Array.from({ length: crisis.perHabit }, (_, k) => ({
      studyId,
      name: `${crisis.genus} ${h.code} ${k + 1} (invented)`,
      higherTaxon: crisis.higherTaxon(k),
      fadMa: 70,
      ladMa: k < h.victims ? 67 : 60,
      traitValues: { [habitId]: h.code },
    })),
  );
}

/**
 * A study lead signed up in `context` (their address returned; the password is PASSWORD), a study
 * with the suggested codebook holding the crisis, and a finished run of the life habit across 66 Ma
 * (epifaunal the reference), all through the API.
 */
export async function studyWithFinishedCrisisRun(
  server: TestApp & { url: string },
  context: BrowserContext,
  crisis: InventedCrisis,
  names: { study: string; run: string },
): Promise<{ studyId: string; runId: string; studyUrl: string; email: string }> {
  const { email, studyId, studyUrl } = await leadWithStudy(
    server.url,
    context.request,
    { label: "lead", name: "Invented Study Lead" },
    { name: names.study, description: "Invented example study.", suggestedCodebook: true },
  );
  const api = `${server.url}/api/studies/${studyId}`;
  const studyTraits = ((await (await context.request.get(`${api}/traits`)).json()) as { traits: Array<{ id: string; key: string }> }).traits;
  const habitId = studyTraits.find((t) => t.key === "life_habit")!.id;
  await server.ctx.db.insert(taxa).values(crisisTaxaRows(crisis, studyId, habitId));
  const run = await context.request.post(`${api}/runs`, { data: { name: names.run, boundaries: [{ boundaryMa: 66 }], traits: [{ traitId: habitId, reference: "epifaunal" }] } });
  expect(run.status()).toBe(202);
  const runId = ((await run.json()) as { id: string }).id;
  await expect
    .poll(async () => ((await (await context.request.get(`${api}/runs/${runId}`)).json()) as { status: string }).status, { timeout: 60_000, interval: 200 })
    .toBe("succeeded");
  return { studyId, runId, studyUrl, email };
}
