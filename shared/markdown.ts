// A small, safe reader of the light markdown used in thread posts. It never passes markup
// through: the source becomes a tree of plain tokens (text is only ever text), which the client
// turns into elements and `markdownToHtml` turns into escaped HTML. What it understands:
// **bold**, *italic*, `code`, [text](https://...) and bare http(s) addresses as links, @mentions
// of given names, lists ("- ", "* ", "1. "), ``` fenced code, and line breaks. Anything else,
// including HTML tags, stays literal text.

export type MarkdownInline =
  | { type: "text"; text: string }
  | { type: "strong"; children: MarkdownInline[] }
  | { type: "em"; children: MarkdownInline[] }
  | { type: "code"; text: string }
  | { type: "link"; href: string; children: MarkdownInline[] }
  | { type: "mention"; name: string }
  | { type: "break" };

export type MarkdownBlock =
  | { type: "paragraph"; children: MarkdownInline[] }
  | { type: "list"; ordered: boolean; start: number; items: MarkdownInline[][] }
  | { type: "codeBlock"; text: string };

export interface MarkdownOptions {
  /** Names that "@Name" marks as a mention (the study's members); the longest match wins. */
  mentionNames?: readonly string[];
}

/** Bodies are at most this long (the API refuses longer ones). */
export const MARKDOWN_MAX_LENGTH = 10_000;

/** Nesting of bold/italic/link inside each other stops here; deeper markers stay text. */
const MAX_DEPTH = 4;

const SAFE_URL = /^https?:\/\/[^\s<>"'`]+$/i;
const BARE_URL = /https?:\/\/[^\s<>"'`]+/iy;
const ITEM = /^( {0,3})([-*+]|(\d{1,9})[.)])\s+(.*)$/;
const FENCE = /^ {0,3}```/;

/** Only http and https addresses become links; everything else (javascript:, data:, relative) stays text. */
export function isSafeHref(href: string): boolean {
  if (!SAFE_URL.test(href)) return false;
  try {
    const url = new URL(href);
    return url.protocol === "http:" || url.protocol === "https:";
  } catch {
    return false;
  }
}

export function parseMarkdown(source: string, options: MarkdownOptions = {}): MarkdownBlock[] {
  const names = [...new Set(options.mentionNames ?? [])].filter((n) => n.trim().length > 0).sort((a, b) => b.length - a.length);
  const inline = (text: string) => parseInline(text, names, 0);
  const lines = source.replace(/\r\n?/g, "\n").split("\n");
  const blocks: MarkdownBlock[] = [];
  let paragraph: string[] = [];
  let list: { ordered: boolean; start: number; items: string[][] } | null = null;

  const flushParagraph = () => {
    if (paragraph.length) blocks.push({ type: "paragraph", children: joinLines(paragraph.map(inline)) });
    paragraph = [];
  };
  const flushList = () => {
    if (list) blocks.push({ type: "list", ordered: list.ordered, start: list.start, items: list.items.map((item) => joinLines(item.map(inline))) });
    list = null;
  };

  for (let i = 0; i < lines.length; i++) {
    const line = lines[i];
    if (FENCE.test(line)) {
      flushParagraph();
      flushList();
      const body: string[] = [];
      i++;
      while (i < lines.length && !FENCE.test(lines[i])) body.push(lines[i++]);
      blocks.push({ type: "codeBlock", text: body.join("\n") });
      continue;
    }
    if (line.trim() === "") {
      flushParagraph();
      flushList();
      continue;
    }
    const item = ITEM.exec(line);
    if (item) {
      const ordered = item[3] !== undefined;
      flushParagraph();
      if (list && list.ordered !== ordered) flushList();
      if (!list) list = { ordered, start: ordered ? Number(item[3]) : 1, items: [] };
      list.items.push([item[4]]);
      continue;
    }
    if (list && /^\s+\S/.test(line)) {
      // An indented line continues the list item above it.
      list.items[list.items.length - 1].push(line.trim());
      continue;
    }
    flushList();
    paragraph.push(line);
  }
  flushParagraph();
  flushList();
  return blocks;
}

function joinLines(lines: MarkdownInline[][]): MarkdownInline[] {
  const out: MarkdownInline[] = [];
  lines.forEach((nodes, i) => {
    if (i > 0) out.push({ type: "break" });
    out.push(...nodes);
  });
  return mergeText(out);
}

function mergeText(nodes: MarkdownInline[]): MarkdownInline[] {
  const out: MarkdownInline[] = [];
  for (const node of nodes) {
    const last = out[out.length - 1];
    if (node.type === "text" && last?.type === "text") out[out.length - 1] = { type: "text", text: last.text + node.text };
    else if (node.type !== "text" || node.text !== "") out.push(node);
  }
  return out;
}

const isWordChar = (ch: string | undefined) => ch !== undefined && /[\p{L}\p{N}_]/u.test(ch);

function parseInline(text: string, names: readonly string[], depth: number): MarkdownInline[] {
  const out: MarkdownInline[] = [];
  let plain = "";
  const flush = () => {
    if (plain) out.push({ type: "text", text: plain });
    plain = "";
  };
  let i = 0;
  while (i < text.length) {
    const ch = text[i];

    if (ch === "\\" && i + 1 < text.length && /[\\`*_[\]()@#+\-.!>]/.test(text[i + 1])) {
      plain += text[i + 1];
      i += 2;
      continue;
    }

    if (ch === "`") {
      const end = text.indexOf("`", i + 1);
      if (end > i + 1) {
        flush();
        out.push({ type: "code", text: text.slice(i + 1, end) });
        i = end + 1;
        continue;
      }
    }

    if (depth < MAX_DEPTH && text.startsWith("**", i)) {
      const end = text.indexOf("**", i + 2);
      if (end > i + 2 && text[i + 2] !== " " && text[end - 1] !== " ") {
        flush();
        out.push({ type: "strong", children: parseInline(text.slice(i + 2, end), names, depth + 1) });
        i = end + 2;
        continue;
      }
    }

    if (depth < MAX_DEPTH && ch === "*" && text[i + 1] !== "*" && text[i + 1] !== " " && text[i + 1] !== undefined) {
      const end = findSingleStar(text, i + 1);
      if (end > i + 1 && text[end - 1] !== " ") {
        flush();
        out.push({ type: "em", children: parseInline(text.slice(i + 1, end), names, depth + 1) });
        i = end + 1;
        continue;
      }
    }

    if (depth < MAX_DEPTH && ch === "[") {
      const link = readLink(text, i);
      if (link) {
        flush();
        out.push({ type: "link", href: link.href, children: parseInline(link.label, names, depth + 1) });
        i = link.end;
        continue;
      }
    }

    if ((ch === "h" || ch === "H") && !isWordChar(text[i - 1])) {
      BARE_URL.lastIndex = i;
      const match = BARE_URL.exec(text);
      if (match) {
        // Punctuation that ends a sentence is not part of the address.
        const href = match[0].replace(/[.,;:!?)\]]+$/, "");
        if (isSafeHref(href)) {
          flush();
          out.push({ type: "link", href, children: [{ type: "text", text: href }] });
          i += href.length;
          continue;
        }
      }
    }

    if (ch === "@" && !isWordChar(text[i - 1]) && names.length) {
      const name = names.find((n) => text.startsWith(n, i + 1) && !isWordChar(text[i + 1 + n.length]));
      if (name) {
        flush();
        out.push({ type: "mention", name });
        i += 1 + name.length;
        continue;
      }
    }

    plain += ch;
    i++;
  }
  flush();
  return mergeText(out);
}

/** The closing single "*" of an italic run (skipping "**" pairs inside it); -1 when none. */
function findSingleStar(text: string, from: number): number {
  for (let j = from; j < text.length; j++) {
    if (text[j] === "\\") {
      j++;
      continue;
    }
    if (text[j] !== "*") continue;
    if (text[j + 1] === "*") {
      const close = text.indexOf("**", j + 2);
      if (close < 0) return -1;
      j = close + 1;
      continue;
    }
    return j;
  }
  return -1;
}

/** `[label](http...)` starting at `start`; null when it is not a link with a safe address. */
function readLink(text: string, start: number): { label: string; href: string; end: number } | null {
  let depth = 0;
  let j = start;
  for (; j < text.length; j++) {
    if (text[j] === "\\") {
      j++;
      continue;
    }
    if (text[j] === "[") depth++;
    else if (text[j] === "]" && --depth === 0) break;
  }
  if (j >= text.length || text[j + 1] !== "(") return null;
  const close = text.indexOf(")", j + 2);
  if (close < 0) return null;
  const href = text.slice(j + 2, close).trim();
  const label = text.slice(start + 1, j);
  if (!label || !isSafeHref(href)) return null;
  return { label, href, end: close + 1 };
}

// ---------------------------------------------------------------- output

const HTML_ESCAPES: Record<string, string> = { "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" };

export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (ch) => HTML_ESCAPES[ch]);
}

function inlineHtml(nodes: MarkdownInline[]): string {
  return nodes
    .map((node) => {
      switch (node.type) {
        case "text":
          return escapeHtml(node.text);
        case "strong":
          return `<strong>${inlineHtml(node.children)}</strong>`;
        case "em":
          return `<em>${inlineHtml(node.children)}</em>`;
        case "code":
          return `<code>${escapeHtml(node.text)}</code>`;
        case "link":
          return `<a href="${escapeHtml(node.href)}" rel="nofollow noopener noreferrer">${inlineHtml(node.children)}</a>`;
        case "mention":
          return `<span class="mention">@${escapeHtml(node.name)}</span>`;
        case "break":
          return "<br>";
      }
    })
    .join("");
}

/** The post as HTML in which every character of the source is escaped; only the tags above are produced. */
export function markdownToHtml(source: string, options: MarkdownOptions = {}): string {
  return parseMarkdown(source, options)
    .map((block) => {
      switch (block.type) {
        case "paragraph":
          return `<p>${inlineHtml(block.children)}</p>`;
        case "codeBlock":
          return `<pre><code>${escapeHtml(block.text)}</code></pre>`;
        case "list": {
          const tag = block.ordered ? "ol" : "ul";
          const start = block.ordered && block.start !== 1 ? ` start="${block.start}"` : "";
          return `<${tag}${start}>${block.items.map((item) => `<li>${inlineHtml(item)}</li>`).join("")}</${tag}>`;
        }
      }
    })
    .join("\n");
}

function inlineText(nodes: MarkdownInline[]): string {
  return nodes
    .map((node) => {
      switch (node.type) {
        case "text":
        case "code":
          return node.text;
        case "strong":
        case "em":
          return inlineText(node.children);
        case "link": {
          const label = inlineText(node.children);
          return label === node.href ? label : `${label} (${node.href})`;
        }
        case "mention":
          return `@${node.name}`;
        case "break":
          return " ";
      }
    })
    .join("");
}

/** The post without its markers, on one line, cut to `max` characters: for e-mails and notifications. */
export function markdownExcerpt(source: string, max = 280): string {
  const text = parseMarkdown(source)
    .map((block) => {
      if (block.type === "paragraph") return inlineText(block.children);
      if (block.type === "codeBlock") return block.text.replace(/\s+/g, " ");
      return block.items.map((item) => `• ${inlineText(item)}`).join(" ");
    })
    .join(" ")
    .replace(/\s+/g, " ")
    .trim();
  return text.length <= max ? text : `${text.slice(0, max - 1).trimEnd()}…`;
}
