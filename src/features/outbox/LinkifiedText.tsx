import { Fragment } from "react";
import { textLinkClasses } from "../../components/TextLink";

const URL_PATTERN = /(https?:\/\/[^\s<>"]+[^\s<>".,;:!?)\]])/g;

/** Plain e-mail text with its web addresses made clickable; everything else stays text. */
export function LinkifiedText({ text }: { text: string }) {
  const parts = text.split(URL_PATTERN);
  return (
    <>
      {parts.map((part, index) =>
        // split() with one capture group puts the matches at the odd positions.
        index % 2 === 1 ? (
          <a key={index} href={part} className={`${textLinkClasses} break-all`}>
            {part}
          </a>
        ) : (
          <Fragment key={index}>{part}</Fragment>
        ),
      )}
    </>
  );
}
