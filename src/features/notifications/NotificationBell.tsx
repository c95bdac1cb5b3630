import { useLocation, useNavigate } from "react-router-dom";
import { Button } from "../../components/Button";
import { focusRing } from "../../components/focus";
import { cx } from "../../lib/cx";
import { Popover } from "../../components/Popover";
import { Spinner } from "../../components/Spinner";
import { errorMessage } from "../../lib/api";
import { formatDateTime } from "../../lib/format";
import { paths } from "../../lib/paths";
import { useMarkAllNotificationsRead, useMarkNotificationRead, useNotifications } from "./api";

/** The bell in the top bar: the unread count, the latest mentions, and marking them read. */
export function NotificationBell() {
  const location = useLocation();
  const navigate = useNavigate();
  const notifications = useNotifications();
  const markRead = useMarkNotificationRead();
  const markAll = useMarkAllNotificationsRead();
  const unread = notifications.data?.unreadCount ?? 0;

  const bell = (
    <>
      <svg className="size-5" viewBox="0 0 20 20" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" strokeLinejoin="round" aria-hidden="true">
        <path d="M10 2.75a4.5 4.5 0 0 0-4.5 4.5v2.6c0 .6-.2 1.2-.55 1.7L4 13.25h12l-.95-1.7a3.4 3.4 0 0 1-.55-1.7v-2.6A4.5 4.5 0 0 0 10 2.75Z" />
        <path d="M8.25 15.75a1.85 1.85 0 0 0 3.5 0" />
      </svg>
      {unread > 0 && (
        <span className="absolute -top-0.5 -right-0.5 inline-flex min-w-5 items-center justify-center rounded-full bg-caution-700 px-1 text-[11px] font-semibold text-white tabular-nums" aria-hidden="true">
          {unread > 99 ? "99+" : unread}
        </span>
      )}
      <span className="sr-only">{unread > 0 ? `Notifications, ${unread} unread` : "Notifications"}</span>
    </>
  );

  return (
    // Any navigation closes the panel (its reset key is the location).
    <Popover
      label={bell}
      title="Mentions"
      chevron={false}
      resetKey={location.key}
      buttonClassName={cx("relative rounded-full p-2 text-stone-600 hover:bg-stone-100 hover:text-stone-900", focusRing)}
      panelClassName="w-[22rem]"
    >
      {(close) => (
        <>
          <div className="flex items-center justify-between gap-3 border-b border-stone-100 px-4 py-3">
            <h2 className="text-[15px] font-semibold text-stone-900">Mentions</h2>
            {unread > 0 && (
              <Button variant="ghost" size="sm" busy={markAll.isPending} onClick={() => markAll.mutate()}>
                Mark all read
              </Button>
            )}
          </div>
          <div className="max-h-[26rem] overflow-y-auto">
            {notifications.isPending && (
              <p className="flex items-center gap-2 px-4 py-4 text-sm text-stone-600">
                <Spinner className="text-accent-600" /> Loading…
              </p>
            )}
            {notifications.isError && (
              <div role="alert" className="px-4 py-4 text-sm text-red-800">
                {errorMessage(notifications.error)}{" "}
                <button type="button" className={cx("font-medium underline", focusRing)} onClick={() => void notifications.refetch()}>
                  Try again
                </button>
              </div>
            )}
            {notifications.isSuccess && notifications.data.rows.length === 0 && (
              <p className="px-4 py-6 text-center text-sm text-stone-600">No mentions yet. When a member writes @ and your name in a thread, it shows here.</p>
            )}
            {notifications.isSuccess && notifications.data.rows.length > 0 && (
              <ul aria-label="Latest mentions" className="divide-y divide-stone-100">
                {notifications.data.rows.map((n) => (
                  <li key={n.id} data-notification={n.id} data-read={n.read}>
                    <button
                      type="button"
                      onClick={() => {
                        if (!n.read) markRead.mutate(n.id);
                        close();
                        if (n.threadId) navigate(paths.thread(n.studyId, n.threadId));
                      }}
                      className={cx("flex w-full gap-3 px-4 py-3 text-left hover:bg-stone-50", focusRing)}
                    >
                      <span className={cx("mt-1.5 size-2 shrink-0 rounded-full", n.read ? "bg-transparent" : "bg-caution-700")} aria-hidden="true" />
                      <span className="min-w-0">
                        <span className={cx("block text-sm", n.read ? "text-stone-600" : "font-medium text-stone-900")}>{n.summary}</span>
                        <span className="mt-0.5 block text-xs text-stone-500">
                          {n.studyName} · <time dateTime={n.createdAt}>{formatDateTime(n.createdAt)}</time>
                          {!n.read && <span className="sr-only"> · unread</span>}
                        </span>
                      </span>
                    </button>
                  </li>
                ))}
              </ul>
            )}
          </div>
          <p className="border-t border-stone-100 px-4 py-2.5 text-xs text-stone-500">
            How mentions reach you by e-mail is set per study, on the study’s overview.
          </p>
        </>
      )}
    </Popover>
  );
}
