import { useEffect } from "react";

/** Names the browser tab after the screen, so history and tabs are readable. */
export function useDocumentTitle(title: string | null | undefined): void {
  useEffect(() => {
    document.title = title ? `${title} · Stratasieve` : "Stratasieve";
  }, [title]);
}
