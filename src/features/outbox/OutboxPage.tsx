import type { OutboxMessage } from "@shared/schemas/outbox";
import { Button } from "../../components/Button";
import { EmptyState } from "../../components/EmptyState";
import { ErrorState } from "../../components/ErrorState";
import { LoadingState } from "../../components/LoadingState";
import { PageHeader } from "../../components/PageHeader";
import { ApiError } from "../../lib/api";
import { formatDateTime, pluralize } from "../../lib/format";
import { useDocumentTitle } from "../../lib/useDocumentTitle";
import { useOutbox } from "./api";
import { LinkifiedText } from "./LinkifiedText";

/** The local fake mailbox: the e-mail this copy of Stratasieve sent to the signed-in person, caught before delivery. */
export function OutboxPage() {
  useDocumentTitle("Outbox");
  const outbox = useOutbox();

  return (
    <>
      <PageHeader
        title="Outbox"
        description={
          <>
            This copy of Stratasieve runs without a real mail server. The e-mail it sends to your address (invitations, mentions, password
            resets) since you created your account is caught by a local fake mailbox and listed here instead of being delivered. Nobody
            else sees it here; the server&rsquo;s console prints every message&rsquo;s links for whoever runs it. A production installation
            has no outbox.
          </>
        }
        actions={
          <Button variant="secondary" onClick={() => void outbox.refetch()} busy={outbox.isFetching && !outbox.isPending}>
            Refresh
          </Button>
        }
      />
      {outbox.isPending && <LoadingState label="Loading the outbox" />}
      {outbox.isError && (
        <ErrorState
          error={outbox.error}
          title={outbox.error instanceof ApiError && outbox.error.status === 404 ? "There is no outbox here" : "The outbox could not be loaded"}
          onRetry={() => void outbox.refetch()}
        />
      )}
      {outbox.isSuccess && outbox.data.length === 0 && (
        <EmptyState
          title="No e-mail for you yet"
          description="Messages to your address appear here: an invitation to a study, a mention in a thread, a notice about your account."
        />
      )}
      {outbox.isSuccess && outbox.data.length > 0 && (
        <>
          <p className="mb-4 text-sm text-stone-500">{pluralize(outbox.data.length, "message")}, newest first.</p>
          <ol className="space-y-4">
            {outbox.data.map((message) => (
              <li key={message.id}>
                <MessageCard message={message} />
              </li>
            ))}
          </ol>
        </>
      )}
    </>
  );
}

function MessageCard({ message }: { message: OutboxMessage }) {
  return (
    <article className="rounded-xl border border-stone-200 bg-white shadow-[0_1px_2px_rgb(28_25_23/0.04)]">
      <header className="border-b border-stone-100 px-5 py-4 sm:px-6">
        <h2 className="font-semibold tracking-tight text-stone-900">{message.subject || "(no subject)"}</h2>
        <dl className="mt-2 grid grid-cols-[3.5rem_1fr] gap-x-3 gap-y-0.5 text-sm">
          <dt className="text-stone-500">To</dt>
          <dd className="break-all text-stone-800">{message.to.join(", ")}</dd>
          <dt className="text-stone-500">From</dt>
          <dd className="break-all text-stone-800">{message.from}</dd>
          <dt className="text-stone-500">Sent</dt>
          <dd className="text-stone-800 tabular-nums">
            <time dateTime={message.receivedAt}>{formatDateTime(message.receivedAt)}</time>
          </dd>
        </dl>
      </header>
      <div className="px-5 py-4 text-[15px] leading-relaxed whitespace-pre-wrap text-stone-700 sm:px-6">
        <LinkifiedText text={message.text} />
      </div>
    </article>
  );
}
