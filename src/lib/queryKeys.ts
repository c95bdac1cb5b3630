// Every TanStack Query key of the client, in one place, so invalidations name the same keys the
// hooks read. Keys nest: invalidating `studies.all` refreshes every study's list, detail and members.
export const queryKeys = {
  me: ["me"] as const,
  studies: {
    all: ["studies"] as const,
    list: () => ["studies", "list"] as const,
    detail: (studyId: string) => ["studies", "detail", studyId] as const,
    members: (studyId: string) => ["studies", "detail", studyId, "members"] as const,
  },
  invitation: (token: string) => ["invitations", token] as const,
  outbox: ["outbox"] as const,
};
