import { useNavigate, useSearchParams } from "react-router-dom";
import { z } from "zod";
import { SUGGESTED_CODEBOOK } from "@shared/codebook";
import { studyCreateSchema } from "@shared/schemas/studies";
import { Button, ButtonLink } from "../../components/Button";
import { Card } from "../../components/Card";
import { FormError } from "../../components/Notice";
import { PageHeader } from "../../components/PageHeader";
import { TextArea, TextField } from "../../components/TextField";
import { useToast } from "../../components/Toast";
import { formLevelMessage, useZodForm } from "../../lib/forms";
import { paths } from "../../lib/paths";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useCreateStudy } from "./api";
import { FIRST_STEP_SCREENS, firstStepFrom, pathAfterCreation } from "./newStudySteps";

// The form keeps text; the checkbox's "yes" becomes the boolean the shared schema (and the server) reads.
const newStudyFormSchema = z.preprocess((values) => {
  const { suggestedCodebook, ...rest } = values as Record<string, string>;
  return { ...rest, suggestedCodebook: suggestedCodebook === "yes" };
}, studyCreateSchema);

export function NewStudyPage() {
  useDocumentTitle("New study");
  const navigate = useNavigate();
  const [params] = useSearchParams();
  const then = firstStepFrom(params.get("then"));
  const toast = useToast();
  const create = useCreateStudy();
  const form = useZodForm(newStudyFormSchema, { name: "", description: "", suggestedCodebook: "" });
  const suggestedNames = SUGGESTED_CODEBOOK.map((t) => t.label.toLowerCase()).join(", ");

  const submit = form.handleSubmit((input) =>
    create.mutate(input, {
      onSuccess: (study) => {
        toast.show(`Study “${study.name}” created. You are its study lead.`);
        navigate(pathAfterCreation(study.id, then));
      },
      onError: form.showServerErrors,
    }),
  );

  return (
    <div className="max-w-2xl">
      <PageHeader
        title="New study"
        description={
          then
            ? `You become the study lead: you invite the team and give each person a role. Once it is created, the study opens on its ${FIRST_STEP_SCREENS[then].name} screen.`
            : "You become the study lead: you invite the team and give each person a role."
        }
      />
      <Card>
        <FormError message={formLevelMessage(create.error)} className="mb-5" />
        <form noValidate onSubmit={submit} className="space-y-5">
          <TextField label="Name" placeholder="e.g. Bivalves across the end-Triassic" {...form.field("name")} />
          <TextArea
            label="Description"
            optional
            rows={5}
            hint="The question, the clade or region, and the boundaries of interest. Members see it on the study’s overview."
            {...form.field("description")}
          />
          <fieldset>
            <legend className="text-sm font-medium text-stone-800">Codebook</legend>
            <label className="mt-2 flex items-start gap-3 text-[15px] text-stone-800">
              <input
                type="checkbox"
                name="suggestedCodebook"
                className="mt-1 size-4 accent-accent-600"
                checked={form.values.suggestedCodebook === "yes"}
                onChange={(event) => form.setValue("suggestedCodebook", event.target.checked ? "yes" : "")}
              />
              <span>
                Start from the suggested codebook
                <span className="block text-sm text-stone-600">
                  Five ecological traits with coding rules ({suggestedNames}), to edit or retire later. Left unticked, the codebook starts empty and you add
                  the traits your question needs.
                </span>
              </span>
            </label>
            {form.errors.suggestedCodebook && <p className="mt-1 text-sm font-medium text-red-700">{form.errors.suggestedCodebook}</p>}
          </fieldset>
          <div className="flex flex-col-reverse gap-3 pt-2 sm:flex-row sm:justify-end">
            <ButtonLink to={paths.home} variant="secondary">
              Cancel
            </ButtonLink>
            <Button type="submit" busy={create.isPending}>
              Create study
            </Button>
          </div>
        </form>
      </Card>
    </div>
  );
}
