// Every TanStack Query key of the client, in one place, so invalidations name the same keys the
// hooks read. Keys nest: invalidating `studies.all` refreshes every study's list, detail and members.
export const queryKeys = {
  me: ["me"] as const,
  apiTokens: ["api-tokens"] as const,
  studies: {
    all: ["studies"] as const,
    list: () => ["studies", "list"] as const,
    detail: (studyId: string) => ["studies", "detail", studyId] as const,
    members: (studyId: string) => ["studies", "detail", studyId, "members"] as const,
  },
  // Trait tables: everything below a study's detail key, so leaving or refreshing a study covers them.
  traits: {
    list: (studyId: string) => ["studies", "detail", studyId, "traits"] as const,
    usage: (studyId: string, traitId: string) => ["studies", "detail", studyId, "traits", traitId, "usage"] as const,
  },
  // The study's own time bins (read by the time-bins screen, the trait table's range cells and imports).
  timeBins: (studyId: string) => ["studies", "detail", studyId, "time-bins"] as const,
  taxa: {
    all: (studyId: string) => ["studies", "detail", studyId, "taxa"] as const,
    page: (studyId: string, query: string) => ["studies", "detail", studyId, "taxa", "page", query] as const,
    history: (studyId: string, taxonId: string, cell: string) => ["studies", "detail", studyId, "taxa", "history", taxonId, cell] as const,
  },
  decisions: {
    all: (studyId: string) => ["studies", "detail", studyId, "decisions"] as const,
    list: (studyId: string, query: string) => ["studies", "detail", studyId, "decisions", query] as const,
  },
  imports: {
    all: (studyId: string) => ["studies", "detail", studyId, "imports"] as const,
    list: (studyId: string, page: number) => ["studies", "detail", studyId, "imports", "list", page] as const,
    detail: (studyId: string, importId: string) => ["studies", "detail", studyId, "imports", "detail", importId] as const,
    settings: (studyId: string) => ["studies", "detail", studyId, "imports", "settings"] as const,
  },
  // Modern comparison: lists and comparisons (the runs it scores with are the runs' own keys).
  modernComparison: {
    lists: (studyId: string) => ["studies", "detail", studyId, "modern-lists"] as const,
    list: (studyId: string, listId: string) => ["studies", "detail", studyId, "modern-lists", listId] as const,
    comparisons: (studyId: string) => ["studies", "detail", studyId, "comparisons"] as const,
    comparison: (studyId: string, comparisonId: string) => ["studies", "detail", studyId, "comparisons", comparisonId] as const,
  },
  // Selectivity runs: the list, one run (polled while it computes), a design preview and a comparison of two.
  runs: {
    all: (studyId: string) => ["studies", "detail", studyId, "runs"] as const,
    lists: (studyId: string) => ["studies", "detail", studyId, "runs", "list"] as const,
    list: (studyId: string, page: number, pageSize: number) => ["studies", "detail", studyId, "runs", "list", page, pageSize] as const,
    detail: (studyId: string, runId: string) => ["studies", "detail", studyId, "runs", "detail", runId] as const,
    preview: (studyId: string, params: string) => ["studies", "detail", studyId, "runs", "preview", params] as const,
    diff: (studyId: string, runId: string, against: string) => ["studies", "detail", studyId, "runs", "diff", runId, against] as const,
  },
  invitation: (token: string) => ["invitations", token] as const,
  outbox: ["outbox"] as const,
  timescale: ["timescale"] as const,
  boundary: {
    outcomesAll: (studyId: string) => ["studies", "detail", studyId, "boundary", "outcomes"] as const,
    outcomes: (studyId: string, query: Record<string, string | number | undefined>) => ["studies", "detail", studyId, "boundary", "outcomes", query] as const,
    overridesAll: (studyId: string) => ["studies", "detail", studyId, "boundary", "overrides"] as const,
    overrides: (studyId: string, query: Record<string, string | number>) => ["studies", "detail", studyId, "boundary", "overrides", query] as const,
    rates: (studyId: string) => ["studies", "detail", studyId, "boundary", "rates"] as const,
    // Below the outcomes so that an override (which changes the scorecard's magnitude) refreshes it too.
    turnover: (studyId: string, query: Record<string, string | number | undefined>) => ["studies", "detail", studyId, "boundary", "outcomes", "turnover", query] as const,
  },
  // Threads below the study (taxa marks and the activity feed change with them); notifications are the person's own.
  threads: {
    all: (studyId: string) => ["studies", "detail", studyId, "threads"] as const,
    list: (studyId: string, query: string) => ["studies", "detail", studyId, "threads", "list", query] as const,
    detail: (studyId: string, threadId: string) => ["studies", "detail", studyId, "threads", "detail", threadId] as const,
  },
  activity: {
    all: (studyId: string) => ["studies", "detail", studyId, "activity"] as const,
    page: (studyId: string, page: number) => ["studies", "detail", studyId, "activity", page] as const,
  },
  notifications: {
    all: ["notifications"] as const,
    list: (query: string) => ["notifications", "list", query] as const,
    preferences: ["notifications", "preferences"] as const,
  },
};
