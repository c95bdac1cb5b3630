import { useEffect, useId, useRef } from "react";
import { useLocation } from "react-router-dom";
import { NOTIFICATION_MODE_LABELS, NOTIFICATION_MODES, notificationPreferenceUpdateSchema, type NotificationMode } from "@shared/schemas/notifications";
import { Card } from "../../components/Card";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { FormError } from "../../components/Notice";
import { Spinner } from "../../components/Spinner";
import { errorMessage } from "../../lib/api";
import { useMentionPreferences, useSetMentionPreference } from "./api";

export const MENTION_EMAILS_ANCHOR = "mention-emails";

/** The caller's choice, for this study, of how @mentions reach them by e-mail. */
export function MentionEmailsCard({ studyId }: { studyId: string }) {
  const prefs = useMentionPreferences();
  const save = useSetMentionPreference(studyId);
  const groupName = useId();
  const ref = useRef<HTMLDivElement>(null);
  const location = useLocation();
  const current = prefs.data?.preferences.find((p) => p.studyId === studyId)?.mode ?? "immediate";

  // The e-mails link here (…#mention-emails); the card appears only after the study loads.
  useEffect(() => {
    if (location.hash === `#${MENTION_EMAILS_ANCHOR}` && prefs.isSuccess) ref.current?.scrollIntoView({ block: "center" });
  }, [location.hash, prefs.isSuccess]);

  const choose = (mode: NotificationMode) => {
    const parsed = notificationPreferenceUpdateSchema.safeParse({ mode });
    if (parsed.success) save.mutate(parsed.data);
  };

  return (
    <div id={MENTION_EMAILS_ANCHOR} ref={ref} className="scroll-mt-24">
      <Card title="Mentions by e-mail" description="When a member mentions you with @ in this study's threads. The bell in the top bar lists mentions either way.">
        {prefs.isPending && <LoadingState label="Loading your choice" lines={0} className="py-0" />}
        {prefs.isError && <ErrorState error={prefs.error} title="Your choice could not be loaded" onRetry={() => void prefs.refetch()} />}
        {prefs.isSuccess && (
          <fieldset disabled={save.isPending}>
            <legend className="sr-only">How mentions reach you by e-mail</legend>
            <div className="space-y-2">
              {NOTIFICATION_MODES.map((mode) => (
                <label key={mode} className="flex items-start gap-2 text-[15px] text-stone-800">
                  <input type="radio" name={groupName} value={mode} className="mt-1 size-4 accent-accent-600" checked={current === mode} onChange={() => choose(mode)} />
                  <span>
                    {NOTIFICATION_MODE_LABELS[mode]}
                    {mode === "digest" && <span className="block text-sm text-stone-500">Sent each morning (07:00 UTC) with the mentions you have not read yet.</span>}
                  </span>
                </label>
              ))}
            </div>
            <div className="mt-3 min-h-5 text-sm" aria-live="polite">
              {save.isPending && (
                <span className="flex items-center gap-2 text-stone-600">
                  <Spinner /> Saving…
                </span>
              )}
              {save.isSuccess && !save.isPending && <span className="font-medium text-accent-700">Saved.</span>}
            </div>
            <FormError message={save.error ? errorMessage(save.error) : null} />
          </fieldset>
        )}
      </Card>
    </div>
  );
}
