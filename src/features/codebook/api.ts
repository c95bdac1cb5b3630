// The codebook's API hooks: one per endpoint, keys from src/lib/queryKeys.ts.
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { Trait, TraitCreateInput, TraitList, TraitReorderInput, TraitUpdateInput, TraitUpdateResult, TraitUsage } from "@shared/schemas/traits";
import { api } from "../../lib/api";
import { queryKeys } from "../../lib/queryKeys";
import { studyApiPath } from "../../lib/queries/paths";

const traitsPath = (studyId: string) => studyApiPath(studyId, "/traits");
const traitPath = (studyId: string, traitId: string) => `${traitsPath(studyId)}/${encodeURIComponent(traitId)}`;

/** GET /api/studies/:studyId/traits/:traitId/usage: how many taxa hold each state or value. */
export function useTraitUsage(studyId: string, traitId: string | null) {
  return useQuery({
    queryKey: queryKeys.traits.usage(studyId, traitId ?? "none"),
    queryFn: ({ signal }) => api.get<TraitUsage>(`${traitPath(studyId, traitId ?? "")}/usage`, signal),
    enabled: traitId !== null,
  });
}

function useInvalidateCodebook(studyId: string) {
  const queryClient = useQueryClient();
  // The trait table's columns and values follow the codebook, so both are refreshed.
  return () =>
    Promise.all([
      queryClient.invalidateQueries({ queryKey: queryKeys.traits.list(studyId) }),
      queryClient.invalidateQueries({ queryKey: queryKeys.taxa.all(studyId) }),
    ]);
}

/** POST /api/studies/:studyId/traits */
export function useCreateTrait(studyId: string) {
  const invalidate = useInvalidateCodebook(studyId);
  return useMutation({
    mutationFn: (input: TraitCreateInput) => api.post<Trait>(traitsPath(studyId), input),
    onSuccess: invalidate,
  });
}

/**
 * PATCH /api/studies/:studyId/traits/:traitId. Refused with 409 (TraitChangeConflict) when the
 * change would orphan values: `remap` then says where the values of removed states go.
 */
export function useUpdateTrait(studyId: string) {
  const invalidate = useInvalidateCodebook(studyId);
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ traitId, changes }: { traitId: string; changes: TraitUpdateInput }) => api.patch<TraitUpdateResult>(traitPath(studyId, traitId), changes),
    onSuccess: (_result, { traitId }) =>
      Promise.all([invalidate(), queryClient.invalidateQueries({ queryKey: queryKeys.traits.usage(studyId, traitId) })]),
  });
}

/** POST /api/studies/:studyId/traits/reorder: the new order of every trait; shown at once, undone if refused. */
export function useReorderTraits(studyId: string) {
  const queryClient = useQueryClient();
  const key = queryKeys.traits.list(studyId);
  return useMutation({
    mutationFn: (input: TraitReorderInput) => api.post<TraitList>(`${traitsPath(studyId)}/reorder`, input),
    onMutate: async (input) => {
      await queryClient.cancelQueries({ queryKey: key });
      const before = queryClient.getQueryData<TraitList>(key);
      if (before) {
        const byId = new Map(before.traits.map((t) => [t.id, t]));
        const traits = input.traitIds.map((id, sortOrder) => ({ ...byId.get(id)!, sortOrder })).filter((t) => t.id);
        queryClient.setQueryData<TraitList>(key, { traits });
      }
      return { before };
    },
    onError: (_error, _input, context) => {
      if (context?.before) queryClient.setQueryData(key, context.before);
    },
    onSettled: () =>
      Promise.all([queryClient.invalidateQueries({ queryKey: key }), queryClient.invalidateQueries({ queryKey: queryKeys.taxa.all(studyId) })]),
  });
}

/** GET /api/studies/:studyId/exports/codebook.csv: the codebook as a file (a plain download link). */
