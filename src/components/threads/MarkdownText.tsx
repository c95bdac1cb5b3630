import { Fragment, useMemo, type ReactNode } from "react";
import { parseMarkdown, type MarkdownInline } from "@shared/markdown";
import { cx } from "../../lib/cx";
import { textLinkClasses } from "../TextLink";

function renderInline(nodes: MarkdownInline[], keyPrefix: string): ReactNode[] {
  return nodes.map((node, i) => {
    const key = `${keyPrefix}.${i}`;
    switch (node.type) {
      case "text":
        return <Fragment key={key}>{node.text}</Fragment>;
      case "strong":
        return <strong key={key} className="font-semibold text-stone-900">{renderInline(node.children, key)}</strong>;
      case "em":
        return <em key={key}>{renderInline(node.children, key)}</em>;
      case "code":
        return (
          <code key={key} className="rounded bg-stone-100 px-1 py-0.5 font-mono text-[0.9em] text-stone-800">
            {node.text}
          </code>
        );
      case "link":
        return (
          <a key={key} href={node.href} className={textLinkClasses} target="_blank" rel="nofollow noopener noreferrer">
            {renderInline(node.children, key)}
          </a>
        );
      case "mention":
        return (
          <span key={key} className="rounded bg-accent-50 px-1 font-medium text-accent-900" data-mention={node.name}>
            @{node.name}
          </span>
        );
      case "break":
        return <br key={key} />;
    }
  });
}

/**
 * A post's body with its light markdown: every character of the source reaches the page as text
 * (React escapes it); only the reader's own tokens become elements, so typed tags stay visible
 * and inert.
 */
export function MarkdownText({ source, mentionNames, className }: { source: string; mentionNames?: readonly string[]; className?: string }) {
  const blocks = useMemo(() => parseMarkdown(source, { mentionNames }), [source, mentionNames]);
  return (
    <div className={cx("space-y-2 text-[15px] leading-relaxed break-words text-stone-800", className)} data-post-body>
      {blocks.map((block, i) => {
        const key = String(i);
        switch (block.type) {
          case "paragraph":
            return <p key={key}>{renderInline(block.children, key)}</p>;
          case "codeBlock":
            return (
              <pre key={key} className="overflow-x-auto rounded-md bg-stone-100 px-3 py-2 font-mono text-sm text-stone-800">
                <code>{block.text}</code>
              </pre>
            );
          case "list": {
            const items = block.items.map((item, j) => <li key={j}>{renderInline(item, `${key}.${j}`)}</li>);
            return block.ordered ? (
              <ol key={key} start={block.start} className="list-decimal space-y-1 pl-6">
                {items}
              </ol>
            ) : (
              <ul key={key} className="list-disc space-y-1 pl-6">
                {items}
              </ul>
            );
          }
        }
      })}
    </div>
  );
}
